/// <reference path="./types/autocannon.d.ts" />
import autocannon from 'autocannon'
import mqtt from 'mqtt'
import pg from 'pg'
import { ensureBuilt } from '../scripts/lib/build'
import { freePort } from '../scripts/lib/ports'
import { startPostgres } from '../scripts/lib/postgres'
import { insertReadingBatch } from '../server/telemetry/insert-batch'
import { ensurePartitions } from '../server/telemetry/partitions'
import type { ReadingRow } from '../server/telemetry/reading-row'
import { startAppProcess, memoryOf } from './lib/app-process'
import { fmt, percentile } from './lib/stats'

// npm run bench:api — API latency under load (autocannon) for the dashboard list, the history
// route over 24 h and 7 days, and the live stream's publish-to-client latency with many listeners.
const DURATION = Number(process.env.BENCH_SECONDS ?? 8)
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 20)
const LISTENERS = Number(process.env.BENCH_LISTENERS ?? 100)
const PASSWORD = 'bench-demo-password'
const DEVICE_PASSWORD = 'bench-device-password'

ensureBuilt()
const cluster = await startPostgres({ dataDir: '.data/pg-bench', port: Number(process.env.BENCH_PG_PORT ?? 54331), database: 'postgres' })
const dbName = `benchapi_${Date.now().toString(36)}`
const admin = new pg.Client({ connectionString: cluster.url })
await admin.connect()
await admin.query(`CREATE DATABASE ${dbName}`)
await admin.end()
const dbUrl = cluster.url.replace(/\/postgres$/, `/${dbName}`)
const port = await freePort()
const mqttPort = await freePort()
const app = await startAppProcess(
  {
    DATABASE_URL: dbUrl,
    MQTT_PORT: String(mqttPort),
    NUXT_SESSION_PASSWORD: 'bench-session-password-0123456789-abcdefgh',
    DEMO_SEED: '1',
    DEMO_PASSWORD: PASSWORD,
    DEMO_DEVICE_PASSWORD: DEVICE_PASSWORD,
  },
  port,
)
const pool = new pg.Pool({ connectionString: dbUrl, max: 4 })
const { rows: [booth] } = await pool.query<{ id: number }>(`SELECT id FROM booths WHERE slug = 'downdraft-1'`)

// Seven days of 1 Hz history for one booth (604,800 rows) for the history route.
const now = Date.now()
const from = now - 7 * 86_400_000
await ensurePartitions(pool, from, now)
let batch: ReadingRow[] = []
for (let t = from; t < now - 60_000; t += 1000) {
  batch.push({ boothId: booth!.id, tsMs: t, receivedMs: t, deviceId: 'larkspur-downdraft-1', seq: null, airTempC: 20 + Math.sin(t / 3.6e6) * 3, rhPct: 55, panelTempC: 19.5, airflowMps: 0.4, boothDpPa: 6, intakeFilterDpPa: 90, exhaustFilterDpPa: 130, heaterOn: false, dewPointC: 10.7 })
  if (batch.length === 10_000) {
    await insertReadingBatch(pool, batch)
    batch = []
  }
}
if (batch.length) await insertReadingBatch(pool, batch)

const login = await fetch(`${app.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'manager@larkspur.example', password: PASSWORD }) })
const cookie = login.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
const headers = { cookie }

async function run(label: string, path: string) {
  const r = await autocannon({ url: app.url + path, connections: CONNECTIONS, duration: DURATION, headers })
  console.log(`  ${label.padEnd(28)} ${fmt(r.requests.average)} req/s   latency p50 ${fmt(r.latency.p50)} ms, p99 ${fmt(r.latency.p99)} ms, max ${fmt(r.latency.max)} ms   non-2xx ${r.non2xx}, errors ${r.errors}`)
}

console.log(`API latency: ${CONNECTIONS} connections × ${DURATION} s each (autocannon), app RSS before ${fmt(memoryOf(app.child.pid!).rssMiB)} MiB`)
await run('GET /api/booths', '/api/booths')
await run('GET readings, last 1 h', `/api/booths/${booth!.id}/readings?from=${new Date(now - 3_600_000).toISOString()}&to=${new Date(now).toISOString()}`)
await run('GET readings, last 24 h', `/api/booths/${booth!.id}/readings?from=${new Date(now - 86_400_000).toISOString()}&to=${new Date(now).toISOString()}`)
await run('GET readings, last 7 days', `/api/booths/${booth!.id}/readings?from=${new Date(from).toISOString()}&to=${new Date(now).toISOString()}`)

// Live stream: LISTENERS open SSE connections on one booth; a device publishes one reading every
// 600 ms (above the twice-a-second throttle); each listener notes when each reading arrives.
const arrivals = new Map<string, number[]>()
const aborts: AbortController[] = []
await Promise.all(
  Array.from({ length: LISTENERS }, async () => {
    const ac = new AbortController()
    aborts.push(ac)
    const res = await fetch(`${app.url}/api/booths/${booth!.id}/live`, { headers, signal: ac.signal })
    const reader = res.body!.getReader()
    void (async () => {
      let buf = ''
      for (;;) {
        const { value, done } = await reader.read().catch(() => ({ value: undefined, done: true }))
        if (done) return
        buf += new TextDecoder().decode(value)
        const parts = buf.split('\n\n')
        buf = parts.pop() ?? ''
        for (const p of parts) {
          const m = /"ts":"([^"]+)"/.exec(p)
          if (p.includes('event: booth') && m) {
            const list = arrivals.get(m[1]!) ?? []
            list.push(performance.now())
            arrivals.set(m[1]!, list)
          }
        }
      }
    })()
  }),
)
const device = mqtt.connect(`mqtt://127.0.0.1:${mqttPort}`, { username: 'larkspur-downdraft-1', password: DEVICE_PASSWORD, clientId: 'larkspur-downdraft-1' })
await new Promise<void>((r) => device.once('connect', () => r()))
const sentAt = new Map<string, number>()
for (let i = 0; i < 20; i++) {
  const ts = new Date().toISOString()
  sentAt.set(ts, performance.now())
  await device.publishAsync('boothbeat/v1/larkspur/downdraft-1/reading', JSON.stringify({ ts, airTempC: 21 + i / 10, rhPct: 50 }), { qos: 1 })
  await new Promise((r) => setTimeout(r, 600))
}
await new Promise((r) => setTimeout(r, 1_000))
const latencies: number[] = []
let delivered = 0
for (const [ts, t0] of sentAt) {
  const got = arrivals.get(ts) ?? []
  delivered += got.length
  for (const t of got) latencies.push(t - t0)
}
console.log(`  live stream, ${LISTENERS} listeners   ${fmt(delivered)} of ${fmt(sentAt.size * LISTENERS)} deliveries; publish → client p50 ${fmt(percentile(latencies, 50))} ms, p99 ${fmt(percentile(latencies, 99))} ms`)
const mem = memoryOf(app.child.pid!)
console.log(`  app RSS after                ${fmt(mem.rssMiB)} MiB (peak ${fmt(mem.peakMiB)} MiB)`)
aborts.forEach((a) => a.abort())
await device.endAsync()
await app.stop()
await pool.end()
process.exit(0)
