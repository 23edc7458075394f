using Npgsql;
using NpgsqlTypes;

namespace Lookahead.Api.Storage;

/// <summary>The stations table of the PostgreSQL store.</summary>
public sealed partial class PostgresModelStore : IStationStore
{
    private const string StationColumns =
        "name, model_reference, model_id, sequence, step_count, estimate, last_applied_input, last_first_move, last_request_hash, last_answer, updated_at";

    private string Stations => $"\"{schema}\".stations";

    public async Task<bool> PutStationAsync(StationRecord station, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);

        // xmax = 0 only on a freshly inserted row: tells created from replaced in the same statement.
        await using var command = dataSource.CreateCommand($"""
            INSERT INTO {Stations} ({StationColumns}) VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11)
            ON CONFLICT (name) DO UPDATE SET model_reference = excluded.model_reference, model_id = excluded.model_id,
                sequence = excluded.sequence, step_count = excluded.step_count, estimate = excluded.estimate,
                last_applied_input = excluded.last_applied_input, last_first_move = excluded.last_first_move,
                last_request_hash = excluded.last_request_hash, last_answer = excluded.last_answer, updated_at = excluded.updated_at
            RETURNING (xmax = 0)
            """);
        AddStation(command, station);
        return (bool)(await command.ExecuteScalarAsync(cancellationToken))!;
    }

    public async Task<StationRecord?> GetStationAsync(string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var command = dataSource.CreateCommand($"SELECT {StationColumns} FROM {Stations} WHERE name = $1");
        command.Parameters.Add(new NpgsqlParameter { Value = name });
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        return await reader.ReadAsync(cancellationToken) ? StationRecord.Read(reader) : null;
    }

    public async Task<StationListing> ListStationsAsync(int offset, int limit, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        var items = new List<StationRecord>();
        await using (var command = dataSource.CreateCommand($"SELECT {StationColumns} FROM {Stations} ORDER BY name COLLATE \"C\" LIMIT $1 OFFSET $2"))
        {
            command.Parameters.Add(new NpgsqlParameter { Value = limit });
            command.Parameters.Add(new NpgsqlParameter { Value = offset });
            await using var reader = await command.ExecuteReaderAsync(cancellationToken);
            while (await reader.ReadAsync(cancellationToken))
            {
                items.Add(StationRecord.Read(reader));
            }
        }

        await using var count = dataSource.CreateCommand($"SELECT COUNT(*) FROM {Stations}");
        return new StationListing(items, (long)(await count.ExecuteScalarAsync(cancellationToken))!);
    }

    public async Task<bool> DeleteStationAsync(string name, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);
        await using var command = dataSource.CreateCommand($"DELETE FROM {Stations} WHERE name = $1");
        command.Parameters.Add(new NpgsqlParameter { Value = name });
        return await command.ExecuteNonQueryAsync(cancellationToken) == 1;
    }

    public async Task<bool> CommitStepAsync(StationRecord next, long expectedSequence, CancellationToken cancellationToken)
    {
        await EnsureSchemaAsync(cancellationToken);

        // The guard in the WHERE clause is the last word between instances: the row lock makes a second writer
        // re-check it after the first commits, and find the sequence moved.
        await using var command = dataSource.CreateCommand($"""
            UPDATE {Stations} SET sequence = $4, step_count = $5, estimate = $6, last_applied_input = $7, last_first_move = $8,
                last_request_hash = $9, last_answer = $10, updated_at = $11
            WHERE name = $1 AND model_id = $3 AND sequence = $12 AND model_reference = $2
            """);
        AddStation(command, next);
        command.Parameters.Add(new NpgsqlParameter { Value = expectedSequence });
        return await command.ExecuteNonQueryAsync(cancellationToken) == 1;
    }

    private static void AddStation(NpgsqlCommand command, StationRecord s)
    {
        command.Parameters.Add(new NpgsqlParameter { Value = s.Name });
        command.Parameters.Add(new NpgsqlParameter { Value = s.ModelReference });
        command.Parameters.Add(new NpgsqlParameter { Value = s.ModelId });
        command.Parameters.Add(new NpgsqlParameter { Value = s.Sequence });
        command.Parameters.Add(new NpgsqlParameter { Value = s.StepCount });
        command.Parameters.Add(Text(s.Estimate));
        command.Parameters.Add(Text(s.LastAppliedInput));
        command.Parameters.Add(Text(s.LastFirstMove));
        command.Parameters.Add(Text(s.LastRequestHash));
        command.Parameters.Add(Text(s.LastAnswer));
        command.Parameters.Add(new NpgsqlParameter { Value = StoreTime.ToStored(s.UpdatedAt) });
    }

    private static NpgsqlParameter Text(string? value) => new() { Value = (object?)value ?? DBNull.Value, NpgsqlDbType = NpgsqlDbType.Text };
}
