using Npgsql;
using NpgsqlTypes;

namespace Lookahead.Api.Storage;

/// <summary>The stations and station_steps tables of the PostgreSQL store.</summary>
public sealed partial class PostgresModelStore : IStationStore
{
    private string Stations => $"\"{schema}\".stations";

    private string StationSteps => $"\"{schema}\".station_steps";

    public async Task<bool> PutStationAsync(StationRecord station, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);

        // xmax = 0 only on a freshly inserted row: tells created from replaced in the same statement.
        bool created;
        await using (var command = new NpgsqlCommand($"""
            INSERT INTO {Stations} ({StationRecord.Columns}) VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14)
            ON CONFLICT (tenant, name) DO UPDATE SET model_reference = excluded.model_reference, model_id = excluded.model_id,
                detail = excluded.detail, sequence = excluded.sequence, step_count = excluded.step_count, estimate = excluded.estimate,
                last_applied_input = excluded.last_applied_input, last_first_move = excluded.last_first_move,
                last_request_hash = excluded.last_request_hash, last_answer = excluded.last_answer,
                last_timestamp = excluded.last_timestamp, updated_at = excluded.updated_at
            RETURNING (xmax = 0)
            """, connection, transaction))
        {
            AddStation(command, station);
            created = (bool)(await command.ExecuteScalarAsync(cancellationToken))!;
        }

        await DeleteStepsAsync(connection, transaction, station.Tenant, station.Name, cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return created;
    }

    public async Task<StationRecord?> GetStationAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var command = dataSource.CreateCommand($"SELECT {StationRecord.Columns} FROM {Stations} WHERE name = $1 AND tenant = $2");
        command.Parameters.Add(new NpgsqlParameter { Value = name });
        command.Parameters.Add(new NpgsqlParameter { Value = tenant });
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        return await reader.ReadAsync(cancellationToken) ? StationRecord.Read(reader) : null;
    }

    public async Task<StationListing> ListStationsAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        var items = new List<StationRecord>();
        await using (var command = dataSource.CreateCommand(tenant is null
            ? $"SELECT {StationRecord.Columns} FROM {Stations} ORDER BY tenant COLLATE \"C\", name COLLATE \"C\" LIMIT $1 OFFSET $2"
            : $"SELECT {StationRecord.Columns} FROM {Stations} WHERE tenant = $3 ORDER BY name COLLATE \"C\" LIMIT $1 OFFSET $2"))
        {
            command.Parameters.Add(new NpgsqlParameter { Value = limit });
            command.Parameters.Add(new NpgsqlParameter { Value = offset });
            if (tenant is not null)
            {
                command.Parameters.Add(new NpgsqlParameter { Value = tenant });
            }

            await using var reader = await command.ExecuteReaderAsync(cancellationToken);
            while (await reader.ReadAsync(cancellationToken))
            {
                items.Add(StationRecord.Read(reader));
            }
        }

        await using var count = dataSource.CreateCommand(tenant is null ? $"SELECT COUNT(*) FROM {Stations}" : $"SELECT COUNT(*) FROM {Stations} WHERE tenant = $1");
        if (tenant is not null)
        {
            count.Parameters.Add(new NpgsqlParameter { Value = tenant });
        }

        return new StationListing(items, (long)(await count.ExecuteScalarAsync(cancellationToken))!);
    }

    public async Task<bool> DeleteStationAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);
        bool deleted;
        await using (var command = new NpgsqlCommand($"DELETE FROM {Stations} WHERE name = $1 AND tenant = $2", connection, transaction))
        {
            command.Parameters.Add(new NpgsqlParameter { Value = name });
            command.Parameters.Add(new NpgsqlParameter { Value = tenant });
            deleted = await command.ExecuteNonQueryAsync(cancellationToken) == 1;
        }

        await DeleteStepsAsync(connection, transaction, tenant, name, cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return deleted;
    }

    public async Task<bool> CommitStepAsync(StationCommit commit, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var connection = await dataSource.OpenConnectionAsync(cancellationToken);
        await using var transaction = await connection.BeginTransactionAsync(cancellationToken);

        // The guard in the WHERE clause is the last word between instances: the row lock makes a second writer
        // re-check it after the first commits, and find the sequence moved.
        await using (var update = new NpgsqlCommand($"""
            UPDATE {Stations} SET model_id = $3, sequence = $5, step_count = $6, estimate = $7, last_applied_input = $8,
                last_first_move = $9, last_request_hash = $10, last_answer = $11, last_timestamp = $12, updated_at = $13
            WHERE name = $1 AND model_reference = $2 AND detail = $4 AND tenant = $14 AND sequence = $15 AND model_id = $16
            """, connection, transaction))
        {
            AddStation(update, commit.Next);
            update.Parameters.Add(new NpgsqlParameter { Value = commit.ExpectedSequence });
            update.Parameters.Add(new NpgsqlParameter { Value = commit.ExpectedModelId });
            if (await update.ExecuteNonQueryAsync(cancellationToken) != 1)
            {
                await transaction.RollbackAsync(cancellationToken);
                return false;
            }
        }

        if (commit.Entry is { } entry)
        {
            await using var log = new NpgsqlCommand($"""
                INSERT INTO {StationSteps} ({StationStepLog.Columns}, tenant) VALUES ($1, $2, $3, $4, $5, $6)
                ON CONFLICT (tenant, name, sequence) DO UPDATE SET stepped_at = excluded.stepped_at, request = excluded.request, answer = excluded.answer
                """, connection, transaction);
            log.Parameters.Add(new NpgsqlParameter { Value = entry.Name });
            log.Parameters.Add(new NpgsqlParameter { Value = entry.Sequence });
            log.Parameters.Add(new NpgsqlParameter { Value = StoreTime.ToStored(entry.SteppedAt) });
            log.Parameters.Add(new NpgsqlParameter { Value = entry.Request });
            log.Parameters.Add(new NpgsqlParameter { Value = entry.Answer });
            log.Parameters.Add(new NpgsqlParameter { Value = commit.Next.Tenant });
            await log.ExecuteNonQueryAsync(cancellationToken);

            await using var trim = new NpgsqlCommand($"DELETE FROM {StationSteps} WHERE name = $1 AND sequence <= $2 AND tenant = $3", connection, transaction);
            trim.Parameters.Add(new NpgsqlParameter { Value = entry.Name });
            trim.Parameters.Add(new NpgsqlParameter { Value = entry.Sequence - commit.HistoryLength });
            trim.Parameters.Add(new NpgsqlParameter { Value = commit.Next.Tenant });
            await trim.ExecuteNonQueryAsync(cancellationToken);
        }

        await transaction.CommitAsync(cancellationToken);
        return true;
    }

    public async Task<IReadOnlyList<StationStepLog>> GetStepsAsync(string tenant, string name, int limit, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var command = dataSource.CreateCommand($"SELECT {StationStepLog.Columns} FROM {StationSteps} WHERE name = $1 AND tenant = $3 ORDER BY sequence DESC LIMIT $2");
        command.Parameters.Add(new NpgsqlParameter { Value = name });
        command.Parameters.Add(new NpgsqlParameter { Value = limit });
        command.Parameters.Add(new NpgsqlParameter { Value = tenant });
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        var steps = new List<StationStepLog>();
        while (await reader.ReadAsync(cancellationToken))
        {
            steps.Add(StationStepLog.Read(reader));
        }

        steps.Reverse();
        return steps;
    }

    private async Task DeleteStepsAsync(NpgsqlConnection connection, NpgsqlTransaction transaction, string tenant, string name, CancellationToken cancellationToken)
    {
        await using var command = new NpgsqlCommand($"DELETE FROM {StationSteps} WHERE name = $1 AND tenant = $2", connection, transaction);
        command.Parameters.Add(new NpgsqlParameter { Value = name });
        command.Parameters.Add(new NpgsqlParameter { Value = tenant });
        await command.ExecuteNonQueryAsync(cancellationToken);
    }

    private static void AddStation(NpgsqlCommand command, StationRecord s)
    {
        command.Parameters.Add(new NpgsqlParameter { Value = s.Name });
        command.Parameters.Add(new NpgsqlParameter { Value = s.ModelReference });
        command.Parameters.Add(new NpgsqlParameter { Value = s.ModelId });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Detail });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Sequence });
        command.Parameters.Add(new NpgsqlParameter { Value = s.StepCount });
        command.Parameters.Add(Text(s.Estimate));
        command.Parameters.Add(Text(s.LastAppliedInput));
        command.Parameters.Add(Text(s.LastFirstMove));
        command.Parameters.Add(Text(s.LastRequestHash));
        command.Parameters.Add(Text(s.LastAnswer));
        command.Parameters.Add(new NpgsqlParameter { Value = s.LastTimestamp is { } t ? StoreTime.ToTicks(t) : DBNull.Value, NpgsqlDbType = NpgsqlDbType.Bigint });
        command.Parameters.Add(new NpgsqlParameter { Value = StoreTime.ToStored(s.UpdatedAt) });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Tenant });
    }

    private static NpgsqlParameter Text(string? value) => new() { Value = (object?)value ?? DBNull.Value, NpgsqlDbType = NpgsqlDbType.Text };
}
