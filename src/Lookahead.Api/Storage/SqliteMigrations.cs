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
        // Tenants: a model's content is stored once, and each tenant that registered it owns it (its own registration
        // time and listing order); aliases and stations are named within a tenant; alias changes record the key that
        // made them. Everything already stored belongs to the default tenant (''). SQLite cannot change a primary
        // key in place, so aliases, stations and their steps are copied into new tables.
        new(4, "tenants, model ownership and who changed an alias", """
            CREATE TABLE model_owners (
                seq INTEGER PRIMARY KEY AUTOINCREMENT,
                tenant TEXT NOT NULL,
                model_id TEXT NOT NULL REFERENCES models(id),
                registered_at INTEGER NOT NULL,
                UNIQUE (tenant, model_id));
            CREATE INDEX model_owners_model ON model_owners(model_id);
            INSERT INTO model_owners (tenant, model_id, registered_at) SELECT '', id, registered_at FROM models ORDER BY seq;

            CREATE TABLE aliases_by_tenant (
                tenant TEXT NOT NULL,
                name TEXT NOT NULL,
                model_id TEXT NOT NULL REFERENCES models(id),
                updated_at INTEGER NOT NULL,
                PRIMARY KEY (tenant, name));
            INSERT INTO aliases_by_tenant (tenant, name, model_id, updated_at) SELECT '', name, model_id, updated_at FROM aliases;
            DROP TABLE aliases;
            ALTER TABLE aliases_by_tenant RENAME TO aliases;
            CREATE INDEX aliases_model ON aliases(model_id);
            ALTER TABLE alias_history ADD COLUMN tenant TEXT NOT NULL DEFAULT '';
            ALTER TABLE alias_history ADD COLUMN changed_by TEXT;
            DROP INDEX alias_history_name;
            CREATE INDEX alias_history_name ON alias_history(tenant, name, seq);

            CREATE TABLE stations_by_tenant (
                tenant TEXT NOT NULL,
                name TEXT NOT NULL,
                model_reference TEXT NOT NULL,
                model_id TEXT NOT NULL,
                sequence INTEGER NOT NULL,
                step_count INTEGER NOT NULL,
                estimate TEXT,
                last_applied_input TEXT,
                last_first_move TEXT,
                last_request_hash TEXT,
                last_answer TEXT,
                updated_at INTEGER NOT NULL,
                detail TEXT NOT NULL DEFAULT 'first-move',
                last_timestamp INTEGER,
                PRIMARY KEY (tenant, name));
            INSERT INTO stations_by_tenant (tenant, name, model_reference, model_id, sequence, step_count, estimate, last_applied_input,
                    last_first_move, last_request_hash, last_answer, updated_at, detail, last_timestamp)
                SELECT '', name, model_reference, model_id, sequence, step_count, estimate, last_applied_input,
                    last_first_move, last_request_hash, last_answer, updated_at, detail, last_timestamp FROM stations;
            DROP TABLE stations;
            ALTER TABLE stations_by_tenant RENAME TO stations;

            CREATE TABLE station_steps_by_tenant (
                tenant TEXT NOT NULL,
                name TEXT NOT NULL,
                sequence INTEGER NOT NULL,
                stepped_at INTEGER NOT NULL,
                request TEXT NOT NULL,
                answer TEXT NOT NULL,
                PRIMARY KEY (tenant, name, sequence)) WITHOUT ROWID;
            INSERT INTO station_steps_by_tenant (tenant, name, sequence, stepped_at, request, answer)
                SELECT '', name, sequence, stepped_at, request, answer FROM station_steps;
            DROP TABLE station_steps;
            ALTER TABLE station_steps_by_tenant RENAME TO station_steps;
            """),
    ]);
}
