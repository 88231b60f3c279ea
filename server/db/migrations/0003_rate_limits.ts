import { sql, type Kysely } from 'kysely'

// Shared counters for rate-limiter-flexible's PostgreSQL store, so every app instance sees the same
// sign-in and PIN attempts. The shape is the one that package expects.
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    CREATE TABLE rate_limits (
      key varchar(255) PRIMARY KEY,
      points integer NOT NULL DEFAULT 0,
      expire bigint
    )`.execute(db)
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`DROP TABLE rate_limits`.execute(db)
}
