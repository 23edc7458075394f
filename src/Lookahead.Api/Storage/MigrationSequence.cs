namespace Lookahead.Api.Storage;

/// <summary>
/// A store's migrations in the order they run. Versions count 1, 2, 3… without gaps, so the highest version a
/// database records is the version it is at, and every earlier step is known to be in it.
/// </summary>
internal sealed class MigrationSequence
{
    /// <exception cref="ArgumentException">The list is empty or its versions do not count 1, 2, 3… in order.</exception>
    public MigrationSequence(params SchemaMigration[] migrations)
    {
        if (migrations.Length == 0)
        {
            throw new ArgumentException("A store's migrations start with its first schema; the list is empty.", nameof(migrations));
        }

        for (int i = 0; i < migrations.Length; i++)
        {
            if (migrations[i].Version != i + 1)
            {
                throw new ArgumentException(
                    $"Migration '{migrations[i].Name}' is number {i + 1} in the list but has version {migrations[i].Version}; versions must count 1, 2, 3… in list order.",
                    nameof(migrations));
            }
        }

        Migrations = migrations;
    }

    public IReadOnlyList<SchemaMigration> Migrations { get; }

    /// <summary>
    /// The schema stores had before they recorded versions: a database holding its tables but no version record
    /// is at this version.
    /// </summary>
    public SchemaMigration Baseline => Migrations[0];

    public int Latest => Migrations[^1].Version;

    /// <summary>The migration a database at <paramref name="current"/> needs next (0: it has none yet), or null when it is up to date.</summary>
    /// <param name="database">Names the database in the message, e.g. "The SQLite store /var/lib/lookahead/store.db".</param>
    /// <exception cref="InvalidOperationException">The database is at a version this build does not know.</exception>
    public SchemaMigration? Next(long current, string database)
    {
        if (current > Latest)
        {
            throw new InvalidOperationException(
                $"{database} is at schema version {current}, but this build of the service knows schema versions up to {Latest}. " +
                "A newer build has migrated it; refusing to open it, because this build could misread or damage data it does not know. " +
                $"Run a build that knows schema version {current}.");
        }

        if (current < 0)
        {
            throw new InvalidOperationException($"{database} records schema version {current}; versions start at 1, so its version record is damaged. Refusing to open it.");
        }

        return current == Latest ? null : Migrations[(int)current];
    }
}
