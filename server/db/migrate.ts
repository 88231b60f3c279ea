import { Migrator, type Kysely, type MigrationResultSet } from 'kysely'
import type pg from 'pg'
import type { Database } from './database'
import { staticMigrations } from './migrations'

// Arbitrary constant shared by every instance: two processes migrating at once queue on it.
const MIGRATION_LOCK_KEY = 704_113_2026

/**
 * Bring the schema to the latest migration. A session-level advisory lock held on its own
 * connection serialises concurrent starts; Kysely's own lock table does the rest.
 */
export async function migrateToLatest(db: Kysely<Database>, pool: pg.Pool): Promise<MigrationResultSet> {
  const lockClient = await pool.connect()
  try {
    await lockClient.query('SELECT pg_advisory_lock($1)', [MIGRATION_LOCK_KEY])
    const migrator = new Migrator({ db, provider: staticMigrations })
    const result = await migrator.migrateToLatest()
    if (result.error) throw result.error instanceof Error ? result.error : new Error(String(result.error))
    return result
  } finally {
    await lockClient.query('SELECT pg_advisory_unlock($1)', [MIGRATION_LOCK_KEY]).catch(() => undefined)
    lockClient.release()
  }
}
