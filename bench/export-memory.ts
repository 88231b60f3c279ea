import pg from 'pg'
import { ensureBuilt } from '../scripts/lib/build'
import { freePort } from '../scripts/lib/ports'
import { startPostgres } from '../scripts/lib/postgres'
import { insertReadingBatch } from '../server/telemetry/insert-batch'
import { ensurePartitions } from '../server/telemetry/partitions'
import type { ReadingRow } from '../server/telemetry/reading-row'
import { startAppProcess, memoryOf } from './lib/app-process'
import { fmt } from './lib/stats'

// npm run bench:export -- [--days 30] [--limit-mib 64]
// Inserts `days` of 1 Hz readings for one booth into a fresh database of the private bench cluster
// (.data/pg-bench, port 54331), starts the built server on it, and downloads as the demo auditor
//   1. the booth's environment log alone (GET /api/evidence/environment-log, CSV), then
//   2. the whole evidence pack (GET /api/evidence/pack, zip of PDF + CSV + manifest),
// through the real routes, sampling the server's resident memory every 50 ms, after a one-hour warm-up
// download through each. Memory must stay flat: the peak may rise at most --limit-mib above the resident
// size just before the download (exit 1 otherwise).
const arg = (name: string, dflt: number) => {
  const i = process.argv.indexOf(`--${name}`)
  return i > 0 ? Number(process.argv[i + 1]) : dflt
}
const DAYS = arg('days', 30)
const LIMIT_MIB = arg('limit-mib', 64)
const DEMO_PASSWORD = 'bench-demo-password'

ensureBuilt()
const cluster = await startPostgres({ dataDir: '.data/pg-bench', port: Number(process.env.BENCH_PG_PORT ?? 54331), database: 'postgres' })
const dbName = `bench_export_${Date.now().toString(36)}`
const admin = new pg.Client({ connectionString: cluster.url })
await admin.connect()
await admin.query(`CREATE DATABASE ${dbName}`)
await admin.end()
const dbUrl = cluster.url.replace(/\/postgres$/, `/${dbName}`)
const pool = new pg.Pool({ connectionString: dbUrl, max: 6 })

const port = await freePort()
const env = {
  DATABASE_URL: dbUrl,
  MQTT_PORT: String(await freePort()),
  NUXT_SESSION_PASSWORD: 'bench-session-password-0123456789-abcdefgh',
  DEMO_SEED: '1',
  DEMO_PASSWORD,
  DEMO_DEVICE_PASSWORD: 'bench-device-password',
  INGEST_SPOOL_DIR: `/tmp/boothbeat-bench-spool-${process.pid}`,
  UPLOAD_DIR: `/tmp/boothbeat-bench-uploads-${process.pid}`,
  SMTP_URL: 'smtp://127.0.0.1:9',
}
const app = await startAppProcess(env, port)
const pid = app.child.pid!

// ── data: `DAYS` of 1 Hz readings for downdraft-1, ending an hour ago ─────────────────────────────
const { rows: [booth] } = await pool.query<{ id: number; slug: string }>(`SELECT id, slug FROM booths WHERE slug = 'downdraft-1'`)
const DAY = 86_400_000
const end = Math.floor((Date.now() - 3_600_000) / 60_000) * 60_000
const start = end - DAYS * DAY
await ensurePartitions(pool, start, end)
const total = DAYS * 86_400
console.log(`export memory benchmark: ${fmt(total)} readings (${DAYS} days at 1 Hz) for one booth`)
const t0 = performance.now()
const row = (s: number): ReadingRow => {
  const tsMs = start + s * 1000
  const dayPhase = ((s % 86_400) / 86_400) * 2 * Math.PI
  const air = Math.round((19 + 4 * Math.sin(dayPhase) + ((s * 7919) % 100) / 250) * 10) / 10
  const rh = Math.round((58 - 10 * Math.sin(dayPhase)) * 10) / 10
  return {
    boothId: booth!.id, tsMs, receivedMs: tsMs, deviceId: 'larkspur-downdraft-1', seq: s,
    airTempC: air, rhPct: rh, panelTempC: Math.round((air - 0.6) * 10) / 10, airflowMps: 0.42, boothDpPa: -3.5 + (s % 10) / 10,
    intakeFilterDpPa: 95, exhaustFilterDpPa: 140, heaterOn: false, dewPointC: Math.round((air - (100 - rh) / 5) * 10) / 10,
  }
}
// Four writers, each on its own run of days (no two touch the same rollup minute).
const BATCH = 5_000
let inserted = 0
await Promise.all(
  Array.from({ length: 4 }, async (_, w) => {
    for (let d = w; d < DAYS; d += 4) {
      for (let s = d * 86_400; s < (d + 1) * 86_400; s += BATCH) {
        const batch = Array.from({ length: Math.min(BATCH, (d + 1) * 86_400 - s) }, (_, i) => row(s + i))
        const n = await insertReadingBatch(pool, batch)
        inserted += n
      }
    }
  }),
)
console.log(`  inserted                 ${fmt(inserted)} rows in ${fmt((performance.now() - t0) / 1000, 1)} s`)
await pool.query('VACUUM ANALYZE readings')

// ── downloads ─────────────────────────────────────────────────────────────────────────────────────
const login = await fetch(`${app.url}/api/auth/login`, {
  method: 'POST',
  headers: { 'content-type': 'application/json' },
  body: JSON.stringify({ email: 'auditor@larkspur.example', password: DEMO_PASSWORD }),
})
if (login.status !== 200) throw new Error(`login failed: ${login.status}`)
const cookie = login.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')

async function settle(): Promise<number> {
  await new Promise((r) => setTimeout(r, 1500))
  return memoryOf(pid).rssMiB
}

interface Run {
  name: string
  bytes: number
  lines: number
  seconds: number
  baseMiB: number
  peakMiB: number
}

async function download(name: string, path: string, countLines: boolean): Promise<Run> {
  const baseMiB = await settle()
  let peakMiB = baseMiB
  const sampler = setInterval(() => (peakMiB = Math.max(peakMiB, memoryOf(pid).rssMiB)), 50)
  const began = performance.now()
  const res = await fetch(`${app.url}${path}`, { headers: { cookie } })
  if (res.status !== 200 || !res.body) throw new Error(`${path}: HTTP ${res.status} ${await res.text()}`)
  let bytes = 0
  let lines = 0
  for await (const chunk of res.body as unknown as AsyncIterable<Buffer>) {
    bytes += chunk.length
    if (countLines) for (let i = chunk.indexOf(10); i !== -1; i = chunk.indexOf(10, i + 1)) lines++
  }
  const seconds = (performance.now() - began) / 1000
  clearInterval(sampler)
  peakMiB = Math.max(peakMiB, memoryOf(pid).rssMiB)
  return { name, bytes, lines, seconds, baseMiB, peakMiB }
}

const q = new URLSearchParams({ boothId: String(booth!.id), from: new Date(start).toISOString(), to: new Date(end).toISOString() }).toString()
// Warm-up: one hour through each route first, so the baseline already holds the code the routes load on
// first use (pdfkit, echarts, the fonts, archiver): what is measured is what the export's length costs.
const warm = new URLSearchParams({ boothId: String(booth!.id), from: new Date(end - 3_600_000).toISOString(), to: new Date(end).toISOString() }).toString()
for (const path of ['/api/evidence/environment-log', '/api/evidence/pack']) {
  const r = await fetch(`${app.url}${path}?${warm}`, { headers: { cookie } })
  if (r.status !== 200) throw new Error(`warm-up ${path}: HTTP ${r.status}`)
  await r.arrayBuffer()
}
const csv = await download('CSV (environment log)', `/api/evidence/environment-log?${q}`, true)
const zip = await download('zip (evidence pack)', `/api/evidence/pack?${q}`, false)
const { rows: recorded } = await pool.query<{ kind: string; reading_count: string }>(`SELECT kind, reading_count FROM exports WHERE period_from = $1 ORDER BY exported_at`, [new Date(start)])
await app.stop()
await pool.end()
const drop = new pg.Client({ connectionString: cluster.url })
await drop.connect()
await drop.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`)
await drop.end()

const rowsOf = (kind: string) => Number(recorded.find((r) => r.kind === kind)?.reading_count ?? NaN)
let ok = true
console.log('')
for (const [r, rows] of [
  [csv, rowsOf('csv')],
  [zip, rowsOf('pack')],
] as const) {
  const rise = r.peakMiB - r.baseMiB
  const flat = rise <= LIMIT_MIB
  ok &&= flat && rows === total
  console.log(`  ${r.name}`)
  console.log(`    rows                   ${fmt(rows)}${rows === total ? '' : `  (expected ${fmt(total)})`}`)
  console.log(`    bytes                  ${fmt(r.bytes)} (${fmt(r.bytes / 1024 / 1024, 1)} MiB)${r === csv ? `, ${fmt(r.lines)} lines` : ''}`)
  console.log(`    seconds                ${fmt(r.seconds, 1)}`)
  console.log(`    rows/s                 ${fmt(rows / r.seconds)}`)
  console.log(`    server RSS             ${fmt(r.baseMiB, 1)} MiB before, ${fmt(r.peakMiB, 1)} MiB peak (+${fmt(rise, 1)} MiB; limit +${LIMIT_MIB}) ${flat ? 'flat' : 'NOT FLAT'}`)
}
console.log(`\n  ${ok ? 'PASS' : 'FAIL'}: memory stayed within ${LIMIT_MIB} MiB of the baseline and every row was exported`)
process.exit(ok ? 0 : 1)
