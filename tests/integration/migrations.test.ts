import { afterAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { createDb, createPool } from '../../server/db/client'
import { migrateToLatest } from '../../server/db/migrate'
import { staticMigrations } from '../../server/db/migrations'
import { createTestDatabase } from '../support/app'

describe('migrations', () => {
  const cleanups: (() => Promise<void>)[] = []
  afterAll(async () => {
    for (const c of cleanups) await c()
  })

  it('run from an empty database to the latest version', async () => {
    const tdb = await createTestDatabase('mig')
    const pool = createPool(tdb.url, 4)
    const db = createDb(pool)
    cleanups.push(async () => {
      await db.destroy()
      await tdb.drop()
    })
    const result = await migrateToLatest(db, pool)
    const names = Object.keys(await staticMigrations.getMigrations())
    expect(result.results?.map((r) => r.migrationName)).toEqual(names)
    expect(result.results?.every((r) => r.status === 'Success')).toBe(true)
    const tables = await sql<{ tablename: string }>`SELECT tablename FROM pg_tables WHERE schemaname = 'public'`.execute(db)
    expect(tables.rows.map((r) => r.tablename)).toEqual(expect.arrayContaining(['users', 'booths', 'devices', 'readings', 'readings_minute']))
    // A second run has nothing left to do.
    const again = await migrateToLatest(db, pool)
    expect(again.results).toEqual([])
  })

  it('are safe when two instances start at once', async () => {
    const tdb = await createTestDatabase('mig2')
    const poolA = createPool(tdb.url, 3)
    const poolB = createPool(tdb.url, 3)
    const a = createDb(poolA)
    const b = createDb(poolB)
    cleanups.push(async () => {
      await a.destroy()
      await b.destroy()
      await tdb.drop()
    })
    const [ra, rb] = await Promise.all([migrateToLatest(a, poolA), migrateToLatest(b, poolB)])
    const applied = [...(ra.results ?? []), ...(rb.results ?? [])].filter((r) => r.status === 'Success')
    expect(applied.length).toBe(Object.keys(await staticMigrations.getMigrations()).length)
  })
})
