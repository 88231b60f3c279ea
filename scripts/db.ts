import { loadEnv, demoPostgres } from './lib/env'
import { startPostgres, stopPostgres } from './lib/postgres'

// npm run db:start | db:stop — the demo's private PostgreSQL (skipped when DATABASE_URL is set).
loadEnv()
const cmd = process.argv[2]
const cfg = demoPostgres()
if (process.env.DATABASE_URL) {
  console.log('DATABASE_URL is set: using that server, nothing to start or stop.')
} else if (cmd === 'start') {
  const pg = await startPostgres(cfg)
  console.log(`DATABASE_URL=${pg.url}`)
} else if (cmd === 'stop') {
  stopPostgres(cfg.dataDir)
} else {
  console.error('usage: tsx scripts/db.ts start|stop')
  process.exit(2)
}
