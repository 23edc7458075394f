namespace Lookahead.Api.Storage;

/// <summary>
/// Every schema change of the PostgreSQL store, oldest first. A change is one new entry at the end with the next
/// version; released entries never change. The statements run with search_path set to the store's schema, so
/// names are unqualified and the same text serves every configured schema.
/// </summary>
internal static class PostgresMigrations
{
    public static MigrationSequence Sequence { get; } = new([
        // IF NOT EXISTS throughout: running version 1 is also how a schema made before versions were recorded is
        // adopted (and completed, should it hold only some of these tables).
        new(1, "models, aliases and alias history", """
            CREATE TABLE IF NOT EXISTS models (
                seq bigserial NOT NULL,
                id text PRIMARY KEY,
                name text,
                document bytea NOT NULL,
                states integer NOT NULL,
                inputs integer NOT NULL,
                outputs integer NOT NULL,
                horizon integer NOT NULL,
                registered_at bigint NOT NULL);
            CREATE UNIQUE INDEX IF NOT EXISTS models_seq ON models (seq);
            CREATE TABLE IF NOT EXISTS aliases (
                name text PRIMARY KEY,
                model_id text NOT NULL REFERENCES models (id),
                updated_at bigint NOT NULL);
            CREATE INDEX IF NOT EXISTS aliases_model ON aliases (model_id);
            CREATE TABLE IF NOT EXISTS alias_history (
                seq bigserial PRIMARY KEY,
                name text NOT NULL,
                model_id text NOT NULL,
                set_at bigint NOT NULL);
            CREATE INDEX IF NOT EXISTS alias_history_name ON alias_history (name, seq);
            """),
        // Stations keep estimator state between steps. No foreign key to models: a model may be deleted while a
        // station still names it, and the station's next step says so instead of the delete failing.
        new(2, "stations", """
            CREATE TABLE stations (
                name text PRIMARY KEY,
                model_reference text NOT NULL,
                model_id text NOT NULL,
                sequence bigint NOT NULL,
                step_count bigint NOT NULL,
                estimate text,
                last_applied_input text,
                last_first_move text,
                last_request_hash text,
                last_answer text,
                updated_at bigint NOT NULL);
            """),
        // Stations answer with a whole plan on request, bridge missed samples by the plant's timestamps and keep their
        // last steps. Existing stations keep answering with the first move.
        new(3, "station detail, timestamps and step history", """
            ALTER TABLE stations ADD COLUMN detail text NOT NULL DEFAULT 'first-move';
            ALTER TABLE stations ADD COLUMN last_timestamp bigint;
            CREATE TABLE station_steps (
                name text NOT NULL,
                sequence bigint NOT NULL,
                stepped_at bigint NOT NULL,
                request text NOT NULL,
                answer text NOT NULL,
                PRIMARY KEY (name, sequence));
            """),
        // Tenants: a model's content is stored once, and each tenant that registered it owns it (its own registration
        // time and listing order); aliases and stations are named within a tenant; alias changes record the key that
        // made them. Everything already stored belongs to the default tenant ('').
        new(4, "tenants, model ownership and who changed an alias", """
            CREATE TABLE model_owners (
                seq bigserial PRIMARY KEY,
                tenant text NOT NULL,
                model_id text NOT NULL REFERENCES models (id),
                registered_at bigint NOT NULL,
                UNIQUE (tenant, model_id));
            CREATE INDEX model_owners_model ON model_owners (model_id);
            INSERT INTO model_owners (tenant, model_id, registered_at) SELECT '', id, registered_at FROM models ORDER BY seq;

            ALTER TABLE aliases ADD COLUMN tenant text NOT NULL DEFAULT '';
            ALTER TABLE aliases DROP CONSTRAINT aliases_pkey;
            ALTER TABLE aliases ADD PRIMARY KEY (tenant, name);
            ALTER TABLE alias_history ADD COLUMN tenant text NOT NULL DEFAULT '';
            ALTER TABLE alias_history ADD COLUMN changed_by text;
            DROP INDEX alias_history_name;
            CREATE INDEX alias_history_name ON alias_history (tenant, name, seq);

            ALTER TABLE stations ADD COLUMN tenant text NOT NULL DEFAULT '';
            ALTER TABLE stations DROP CONSTRAINT stations_pkey;
            ALTER TABLE stations ADD PRIMARY KEY (tenant, name);
            ALTER TABLE station_steps ADD COLUMN tenant text NOT NULL DEFAULT '';
            ALTER TABLE station_steps DROP CONSTRAINT station_steps_pkey;
            ALTER TABLE station_steps ADD PRIMARY KEY (tenant, name, sequence);
            """),
    ]);
}
