import { sql, type Kysely } from 'kysely'

// Evidence exports: one row per pack or CSV handed out, written in the same transaction as its
// evidence.exported event. Rows are never changed (a trigger refuses UPDATE and DELETE, as for the event log).
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE exports (
      id uuid PRIMARY KEY,
      kind text NOT NULL CHECK (kind IN ('pack', 'csv')),
      scope text NOT NULL CHECK (scope IN ('job', 'booth')),
      job_id integer REFERENCES jobs(id),
      booth_id integer REFERENCES booths(id),
      period_from timestamptz NOT NULL,
      period_to timestamptz NOT NULL,
      exported_by integer REFERENCES users(id),
      exported_by_label text NOT NULL,
      exported_at timestamptz NOT NULL DEFAULT now(),
      file_name text NOT NULL,
      files jsonb NOT NULL,
      manifest_sha256 text,
      manifest text,
      reading_count bigint NOT NULL,
      event_seq bigint NOT NULL,
      CHECK ((scope = 'job') = (job_id IS NOT NULL)),
      CHECK (scope = 'job' OR booth_id IS NOT NULL)
    )`.execute(db)
  await sql`CREATE INDEX exports_exported_at_idx ON exports (exported_at DESC, id)`.execute(db)
  await sql`CREATE INDEX exports_job_idx ON exports (job_id) WHERE job_id IS NOT NULL`.execute(db)
  await sql`
    CREATE FUNCTION exports_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'exports is append-only';
    END $$`.execute(db)
  await sql`
    CREATE TRIGGER exports_append_only BEFORE UPDATE OR DELETE ON exports
    FOR EACH ROW EXECUTE FUNCTION exports_refuse_change()`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE exports`.execute(db)
  await sql`DROP FUNCTION exports_refuse_change`.execute(db)
}
