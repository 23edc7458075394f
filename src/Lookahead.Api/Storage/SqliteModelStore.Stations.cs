using Microsoft.Data.Sqlite;

namespace Lookahead.Api.Storage;

/// <summary>The stations and station_steps tables of the SQLite store, on the same durable connections as the models.</summary>
public sealed partial class SqliteModelStore : IStationStore
{
    public async Task<bool> PutStationAsync(StationRecord station, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);

        // BEGIN IMMEDIATE: whether the name existed, the write and the cleared history are one decision.
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        bool existed = await ScalarAsync<string>(
            connection, transaction, "SELECT name FROM stations WHERE tenant = $tenant AND name = $name", [("$tenant", station.Tenant), ("$name", station.Name)], cancellationToken) is not null;
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = $"""
            INSERT OR REPLACE INTO stations ({StationRecord.Columns})
            VALUES ($name, $reference, $model, $detail, $sequence, $steps, $estimate, $applied, $move, $hash, $answer, $timestamp, $at, $tenant);
            DELETE FROM station_steps WHERE tenant = $tenant AND name = $name;
            """;
        AddStation(command, station);
        await command.ExecuteNonQueryAsync(cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return !existed;
    }

    public async Task<StationRecord?> GetStationAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = $"SELECT {StationRecord.Columns} FROM stations WHERE tenant = $tenant AND name = $name";
        command.Parameters.AddWithValue("$tenant", tenant);
        command.Parameters.AddWithValue("$name", name);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        return await reader.ReadAsync(cancellationToken) ? StationRecord.Read(reader) : null;
    }

    public async Task<StationListing> ListStationsAsync(string? tenant, int offset, int limit, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = tenant is null
            ? $"""
               SELECT {StationRecord.Columns} FROM stations ORDER BY tenant, name LIMIT $limit OFFSET $offset;
               SELECT COUNT(*) FROM stations;
               """
            : $"""
               SELECT {StationRecord.Columns} FROM stations WHERE tenant = $tenant ORDER BY name LIMIT $limit OFFSET $offset;
               SELECT COUNT(*) FROM stations WHERE tenant = $tenant;
               """;
        command.Parameters.AddWithValue("$tenant", (object?)tenant ?? DBNull.Value);
        command.Parameters.AddWithValue("$limit", limit);
        command.Parameters.AddWithValue("$offset", offset);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        var items = new List<StationRecord>();
        while (await reader.ReadAsync(cancellationToken))
        {
            items.Add(StationRecord.Read(reader));
        }

        await reader.NextResultAsync(cancellationToken);
        await reader.ReadAsync(cancellationToken);
        return new StationListing(items, reader.GetInt64(0));
    }

    public async Task<bool> DeleteStationAsync(string tenant, string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        bool deleted = await ExecuteAsync(connection, transaction, "DELETE FROM stations WHERE tenant = $tenant AND name = $name", tenant, name, cancellationToken) == 1;
        await ExecuteAsync(connection, transaction, "DELETE FROM station_steps WHERE tenant = $tenant AND name = $name", tenant, name, cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return deleted;
    }

    /// <summary>Through the store's one step writer: steps arriving together share a transaction and its fsync.</summary>
    public Task<bool> CommitStepAsync(StationCommit commit, CancellationToken cancellationToken) => StepWriter.CommitAsync(commit);

    public async Task<IReadOnlyList<StationStepLog>> GetStepsAsync(string tenant, string name, int limit, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = $"SELECT {StationStepLog.Columns} FROM station_steps WHERE tenant = $tenant AND name = $name ORDER BY sequence DESC LIMIT $limit";
        command.Parameters.AddWithValue("$tenant", tenant);
        command.Parameters.AddWithValue("$name", name);
        command.Parameters.AddWithValue("$limit", limit);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        var steps = new List<StationStepLog>();
        while (await reader.ReadAsync(cancellationToken))
        {
            steps.Add(StationStepLog.Read(reader));
        }

        steps.Reverse();
        return steps;
    }

    internal static void AddStation(SqliteCommand command, StationRecord s)
    {
        command.Parameters.AddWithValue("$tenant", s.Tenant);
        command.Parameters.AddWithValue("$name", s.Name);
        command.Parameters.AddWithValue("$reference", s.ModelReference);
        command.Parameters.AddWithValue("$model", s.ModelId);
        command.Parameters.AddWithValue("$detail", s.Detail);
        command.Parameters.AddWithValue("$sequence", s.Sequence);
        command.Parameters.AddWithValue("$steps", s.StepCount);
        command.Parameters.AddWithValue("$estimate", (object?)s.Estimate ?? DBNull.Value);
        command.Parameters.AddWithValue("$applied", (object?)s.LastAppliedInput ?? DBNull.Value);
        command.Parameters.AddWithValue("$move", (object?)s.LastFirstMove ?? DBNull.Value);
        command.Parameters.AddWithValue("$hash", (object?)s.LastRequestHash ?? DBNull.Value);
        command.Parameters.AddWithValue("$answer", (object?)s.LastAnswer ?? DBNull.Value);
        command.Parameters.AddWithValue("$timestamp", s.LastTimestamp is { } t ? StoreTime.ToTicks(t) : DBNull.Value);
        command.Parameters.AddWithValue("$at", StoreTime.ToStored(s.UpdatedAt));
    }
}
