namespace Lookahead.Api.Storage;

/// <summary>
/// Every schema change of the SQLite store, oldest first. A change is one new entry at the end with the next
/// version; released entries never change.
/// </summary>
internal static class SqliteMigrations
{
    public static MigrationSequence Sequence { get; } = new([
        // IF NOT EXISTS throughout: running version 1 is also how a database made before versions were recorded is
        // adopted (and completed, should it hold only some of these tables).
        new(1, "models, aliases and alias history", """
            CREATE TABLE IF NOT EXISTS models (
                seq INTEGER PRIMARY KEY AUTOINCREMENT,
                id TEXT NOT NULL UNIQUE,
                name TEXT,
                document BLOB NOT NULL,
                states INTEGER NOT NULL,
                inputs INTEGER NOT NULL,
                outputs INTEGER NOT NULL,
                horizon INTEGER NOT NULL,
                registered_at INTEGER NOT NULL);
            CREATE TABLE IF NOT EXISTS aliases (
                name TEXT PRIMARY KEY,
                model_id TEXT NOT NULL REFERENCES models(id),
                updated_at INTEGER NOT NULL);
            CREATE INDEX IF NOT EXISTS aliases_model ON aliases(model_id);
            CREATE TABLE IF NOT EXISTS alias_history (
                seq INTEGER PRIMARY KEY AUTOINCREMENT,
                name TEXT NOT NULL,
                model_id TEXT NOT NULL,
                set_at INTEGER NOT NULL);
            CREATE INDEX IF NOT EXISTS alias_history_name ON alias_history(name, seq);
            """),
        // Stations keep estimator state between steps. No foreign key to models: a model may be deleted while a
        // station still names it, and the station's next step says so instead of the delete failing.
        new(2, "stations", """
            CREATE TABLE stations (
                name TEXT PRIMARY KEY,
                model_reference TEXT NOT NULL,
                model_id TEXT NOT NULL,
                sequence INTEGER NOT NULL,
                step_count INTEGER NOT NULL,
                estimate TEXT,
                last_applied_input TEXT,
                last_first_move TEXT,
                last_request_hash TEXT,
                last_answer TEXT,
                updated_at INTEGER NOT NULL);
            """),
        // Stations answer with a whole plan on request, bridge missed samples by the plant's timestamps and keep their
        // last steps. Existing stations keep answering with the first move.
        new(3, "station detail, timestamps and step history", """
            ALTER TABLE stations ADD COLUMN detail TEXT NOT NULL DEFAULT 'first-move';
            ALTER TABLE stations ADD COLUMN last_timestamp INTEGER;
            CREATE TABLE station_steps (
                name TEXT NOT NULL,
                sequence INTEGER NOT NULL,
                stepped_at INTEGER NOT NULL,
                request TEXT NOT NULL,
                answer TEXT NOT NULL,
                PRIMARY KEY (name, sequence)) WITHOUT ROWID;
            """),
    ]);
}
