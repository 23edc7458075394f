using Microsoft.Data.Sqlite;

namespace Lookahead.Api.Storage;

/// <summary>The stations table of the SQLite store, on the same durable connections as the models.</summary>
public sealed partial class SqliteModelStore : IStationStore
{
    private const string StationColumns =
        "name, model_reference, model_id, sequence, step_count, estimate, last_applied_input, last_first_move, last_request_hash, last_answer, updated_at";

    public async Task<bool> PutStationAsync(StationRecord station, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);

        // BEGIN IMMEDIATE: whether the name existed and the write are one decision.
        await using var transaction = (SqliteTransaction)await connection.BeginTransactionAsync(cancellationToken);
        bool existed = await ScalarAsync<string>(connection, transaction, "SELECT name FROM stations WHERE name = $name", ("$name", station.Name), cancellationToken) is not null;
        await using var command = connection.CreateCommand();
        command.Transaction = transaction;
        command.CommandText = $"""
            INSERT OR REPLACE INTO stations ({StationColumns})
            VALUES ($name, $reference, $model, $sequence, $steps, $estimate, $applied, $move, $hash, $answer, $at)
            """;
        AddStation(command, station);
        await command.ExecuteNonQueryAsync(cancellationToken);
        await transaction.CommitAsync(cancellationToken);
        return !existed;
    }

    public async Task<StationRecord?> GetStationAsync(string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = $"SELECT {StationColumns} FROM stations WHERE name = $name";
        command.Parameters.AddWithValue("$name", name);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        return await reader.ReadAsync(cancellationToken) ? StationRecord.Read(reader) : null;
    }

    public async Task<StationListing> ListStationsAsync(int offset, int limit, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = $"""
            SELECT {StationColumns} FROM stations ORDER BY name LIMIT $limit OFFSET $offset;
            SELECT COUNT(*) FROM stations;
            """;
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

    public async Task<bool> DeleteStationAsync(string name, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();
        command.CommandText = "DELETE FROM stations WHERE name = $name";
        command.Parameters.AddWithValue("$name", name);
        return await command.ExecuteNonQueryAsync(cancellationToken) == 1;
    }

    public async Task<bool> CommitStepAsync(StationRecord next, long expectedSequence, CancellationToken cancellationToken)
    {
        await using var connection = await OpenAsync(cancellationToken);
        await using var command = connection.CreateCommand();

        // One statement is its own transaction: the guard and the write cannot be separated by another writer.
        command.CommandText = """
            UPDATE stations SET sequence = $sequence, step_count = $steps, estimate = $estimate,
                last_applied_input = $applied, last_first_move = $move, last_request_hash = $hash, last_answer = $answer,
                updated_at = $at
            WHERE name = $name AND sequence = $expected AND model_id = $model AND model_reference = $reference
            """;
        AddStation(command, next);
        command.Parameters.AddWithValue("$expected", expectedSequence);
        return await command.ExecuteNonQueryAsync(cancellationToken) == 1;
    }

    private static void AddStation(SqliteCommand command, StationRecord s)
    {
        command.Parameters.AddWithValue("$name", s.Name);
        command.Parameters.AddWithValue("$reference", s.ModelReference);
        command.Parameters.AddWithValue("$model", s.ModelId);
        command.Parameters.AddWithValue("$sequence", s.Sequence);
        command.Parameters.AddWithValue("$steps", s.StepCount);
        command.Parameters.AddWithValue("$estimate", (object?)s.Estimate ?? DBNull.Value);
        command.Parameters.AddWithValue("$applied", (object?)s.LastAppliedInput ?? DBNull.Value);
        command.Parameters.AddWithValue("$move", (object?)s.LastFirstMove ?? DBNull.Value);
        command.Parameters.AddWithValue("$hash", (object?)s.LastRequestHash ?? DBNull.Value);
        command.Parameters.AddWithValue("$answer", (object?)s.LastAnswer ?? DBNull.Value);
        command.Parameters.AddWithValue("$at", StoreTime.ToStored(s.UpdatedAt));
    }
}
