import { sql, type Kysely } from 'kysely'

// The append-only, hash-chained record of every action. Rows are written only by
// server/domain/event-log.ts; a trigger refuses UPDATE and DELETE as a second line of defence (the
// chain itself shows any change made by someone who bypasses it).
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE event_log (
      seq bigint PRIMARY KEY,
      at timestamptz NOT NULL,
      type text NOT NULL,
      actor_id integer,
      actor_label text NOT NULL,
      subject_type text NOT NULL,
      subject_id text NOT NULL,
      payload text NOT NULL,
      prev_hash text NOT NULL,
      hash text NOT NULL UNIQUE
    )`.execute(db)
  await sql`CREATE INDEX event_log_subject_idx ON event_log (subject_type, subject_id)`.execute(db)
  await sql`CREATE INDEX event_log_at_idx ON event_log (at)`.execute(db)
  await sql`
    CREATE FUNCTION event_log_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'event_log is append-only';
    END $$`.execute(db)
  await sql`
    CREATE TRIGGER event_log_append_only BEFORE UPDATE OR DELETE ON event_log
    FOR EACH ROW EXECUTE FUNCTION event_log_refuse_change()`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE event_log`.execute(db)
  await sql`DROP FUNCTION event_log_refuse_change`.execute(db)
}
