import { createDb, createPool } from '../server/db/client'
import { migrateToLatest } from '../server/db/migrate'
import { demoPostgres, loadEnv } from './lib/env'
import { startPostgres } from './lib/postgres'

// npm run db:migrate — bring the database to the latest schema (the server also does this at start).
loadEnv()
const url = process.env.DATABASE_URL ?? (await startPostgres(demoPostgres())).url
const pool = createPool(url, 2)
const db = createDb(pool)
try {
  const r = await migrateToLatest(db, pool)
  for (const m of r.results ?? []) console.log(`${m.status === 'Success' ? 'applied' : m.status}: ${m.migrationName}`)
  if (!r.results?.length) console.log('already up to date')
} finally {
  await db.destroy()
}
