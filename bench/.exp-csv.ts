// scratch experiment (deleted afterwards)
import pg from 'pg'
import { Writable } from 'node:stream'
import { clusterUrl } from '../scripts/lib/postgres'
import { createDb, createPool } from '../server/db/client'
import { insertReadingBatch } from '../server/telemetry/insert-batch'
import { ensurePartitions } from '../server/telemetry/partitions'
import { environmentLog } from '../server/evidence/environment-log'

const url = clusterUrl('.data/pg-bench', 54331, 'postgres')
const dbName = 'bench_exp_csv'
const DAYS = Number(process.argv[2] ?? 3)
const admin = new pg.Client({ connectionString: url })
await admin.connect()
const exists = (await admin.query('SELECT 1 FROM pg_database WHERE datname = $1', [dbName])).rowCount
if (!exists) await admin.query(`CREATE DATABASE ${dbName}`)
await admin.end()
const pool = createPool(url.replace(/\/postgres$/, `/${dbName}`), 4)
const db = createDb(pool)
if (!exists) {
  const { migrateToLatest } = await import('../server/db/migrate')
  await migrateToLatest(db, pool)
  await pool.query(`INSERT INTO sites (slug, name) VALUES ('s', 's')`)
  await pool.query(`INSERT INTO booths (site_id, slug, name, kind) VALUES (1, 'b1', 'b1', 'downdraft')`)
  const start = Date.UTC(2026, 9, 1)
  await ensurePartitions(pool, start, start + DAYS * 86_400_000)
  for (let s = 0; s < DAYS * 86400; s += 5000) {
    const rows = Array.from({ length: Math.min(5000, DAYS * 86400 - s) }, (_, i) => {
      const t = start + (s + i) * 1000
      return { boothId: 1, tsMs: t, receivedMs: t, deviceId: 'dev-1', seq: s + i, airTempC: 20.1, rhPct: 55.5, panelTempC: 19.4, airflowMps: 0.42, boothDpPa: -3.5, intakeFilterDpPa: 95, exhaustFilterDpPa: 140, heaterOn: false, dewPointC: 10.9 }
    })
    await insertReadingBatch(pool, rows)
  }
  await pool.query('VACUUM ANALYZE readings')
}
const mem = () => { const m = process.memoryUsage(); return `rss ${(m.rss / 2 ** 20).toFixed(0)} heapT ${(m.heapTotal / 2 ** 20).toFixed(0)} heapU ${(m.heapUsed / 2 ** 20).toFixed(0)} ext ${(m.external / 2 ** 20).toFixed(0)} ab ${(m.arrayBuffers / 2 ** 20).toFixed(0)}` }
console.log('before', mem())
const t0 = performance.now()
const log = await environmentLog(db, [{ id: 1, slug: 'b1', name: 'b1' }], new Date(Date.UTC(2026, 9, 1)), new Date(Date.UTC(2026, 9, 1) + DAYS * 86_400_000))
let bytes = 0
let peak = 0
const iv = setInterval(() => { peak = Math.max(peak, process.memoryUsage().rss); }, 50)
const iv2 = setInterval(() => console.log('  ', log.rows(), mem()), 2000)
await new Promise<void>((resolve, reject) => log.stream.pipe(new Writable({ write(c, _e, cb) { bytes += c.length; cb() } })).on('finish', resolve).on('error', reject))
clearInterval(iv); clearInterval(iv2)
const sec = (performance.now() - t0) / 1000
console.log(`rows ${log.rows()} bytes ${bytes} ${sec.toFixed(1)} s ${(log.rows() / sec).toFixed(0)} rows/s peak rss ${(peak / 2 ** 20).toFixed(0)}`, mem())
await db.destroy()
