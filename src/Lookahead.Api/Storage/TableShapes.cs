using System.Data.Common;

namespace Lookahead.Api.Storage;

/// <summary>
/// The tables of a database with a one-line description of each column, in column order. It tells whether tables
/// found in a database that records no schema version are the ones the store's first schema creates.
/// </summary>
internal sealed class TableShapes
{
    private readonly Dictionary<string, List<string>> tables;

    private TableShapes(Dictionary<string, List<string>> tables) => this.tables = tables;

    public bool IsEmpty => tables.Count == 0;

    /// <summary>Reads rows of (table name, column description), ordered by table and then column position.</summary>
    public static async Task<TableShapes> ReadAsync(DbCommand command, CancellationToken cancellationToken)
    {
        var tables = new Dictionary<string, List<string>>(StringComparer.Ordinal);
        await using var reader = await command.ExecuteReaderAsync(cancellationToken);
        while (await reader.ReadAsync(cancellationToken))
        {
            string table = reader.GetString(0);
            if (!tables.TryGetValue(table, out var columns))
            {
                columns = [];
                tables.Add(table, columns);
            }

            columns.Add(reader.GetString(1));
        }

        return new TableShapes(tables);
    }

    /// <summary>
    /// Throws when a table of <paramref name="baseline"/> is present here with other columns. Such a table belongs to
    /// something else; adopting it would let the store open and then fail on every query. Missing tables and tables
    /// the baseline does not have are fine: running the baseline (all IF NOT EXISTS) adds the first and leaves the second.
    /// </summary>
    /// <exception cref="InvalidOperationException">A baseline table is present with other columns.</exception>
    public void EnsureAdoptableAs(TableShapes baseline, string database)
    {
        foreach (var (table, expected) in baseline.tables)
        {
            if (tables.TryGetValue(table, out var actual) && !actual.SequenceEqual(expected, StringComparer.Ordinal))
            {
                throw new InvalidOperationException(
                    $"{database} records no schema version and has a table '{table}' with columns ({string.Join(", ", actual)}), " +
                    $"but the store's first schema has ({string.Join(", ", expected)}). Refusing to adopt a table the store did not create; " +
                    "point the store at a database of its own.");
            }
        }
    }
}
