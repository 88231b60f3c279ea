import { writeFileSync, chmodSync, rmSync } from 'node:fs'
import mqtt, { type MqttClient } from 'mqtt'
import pg from 'pg'
import { ensureBuilt } from '../scripts/lib/build'
import { freePort } from '../scripts/lib/ports'
import { startPostgres } from '../scripts/lib/postgres'
import { startAppProcess, memoryOf, type AppProcess } from './lib/app-process'
import { startMosquitto, type Mosquitto } from '../tests/support/mosquitto'
import { fmt, percentile } from './lib/stats'

// npm run bench:ingest -- [--devices K] [--readings N] [--window W] [--instances 1|2]
// K devices publish N readings each (QoS 1) through the embedded broker of a running app into a
// fresh database; with --instances 2, through Debian's Mosquitto to two app instances that split
// the stream with a shared subscription. A probe device publishes one reading every 100 ms during the run and waits for
// its row, which gives publish-to-row latency under load. Then a plain server-side COPY of the
// same number of rows into the same table gives the ceiling.
const arg = (name: string, dflt: number) => {
  const i = process.argv.indexOf(`--${name}`)
  return i > 0 ? Number(process.argv[i + 1]) : dflt
}
const K = arg('devices', 10)
const N = arg('readings', 20_000)
const WINDOW = arg('window', 500)
const INSTANCES = arg('instances', 1)
const PASSWORD = 'bench-device-password'

ensureBuilt()
const cluster = await startPostgres({ dataDir: '.data/pg-bench', port: Number(process.env.BENCH_PG_PORT ?? 54331), database: 'postgres' })
const dbName = `bench_${Date.now().toString(36)}`
const admin = new pg.Client({ connectionString: cluster.url })
await admin.connect()
await admin.query(`CREATE DATABASE ${dbName}`)
await admin.end()
const dbUrl = cluster.url.replace(/\/postgres$/, `/${dbName}`)
const pool = new pg.Pool({ connectionString: dbUrl, max: 4 })

const port = await freePort()
let mqttPort = await freePort()
const env: Record<string, string> = {
  DATABASE_URL: dbUrl,
  MQTT_PORT: String(mqttPort),
  NUXT_SESSION_PASSWORD: 'bench-session-password-0123456789-abcdefgh',
  DEMO_SEED: '1',
  DEMO_PASSWORD: 'bench-demo-password',
  DEMO_DEVICE_PASSWORD: PASSWORD,
  MQTT_DEVICE_MSG_RATE: '1000000',
  MQTT_DEVICE_MSG_BURST: '1000000',
  INGEST_SPOOL_DIR: `/tmp/boothbeat-bench-spool-${process.pid}`,
  BOOTHBEAT_ALERTS: process.env.BOOTHBEAT_ALERTS ?? 'on',
}
// First start migrates and seeds; then the bench booths are added and the app restarted so its
// booth directory holds them from the first message.
let app = await startAppProcess(env, port)
await app.stop()
const { rows: [site] } = await pool.query<{ id: number }>(`SELECT id FROM sites WHERE slug = 'larkspur'`)
const { rows: [dev] } = await pool.query<{ secret_hash: string }>(`SELECT secret_hash FROM devices LIMIT 1`)
for (let i = 1; i <= K + 1; i++) {
  const slug = i <= K ? `bench-${i}` : 'bench-probe'
  const { rows: [b] } = await pool.query<{ id: number }>(`INSERT INTO booths (site_id, slug, name, kind) VALUES ($1, $2, $2, 'downdraft') RETURNING id`, [site!.id, slug])
  await pool.query(`INSERT INTO devices (id, booth_id, secret_hash) VALUES ($1, $2, $3)`, [`larkspur-${slug}`, b!.id, dev!.secret_hash])
}
let broker: Mosquitto | undefined
const apps: AppProcess[] = []
if (INSTANCES > 1) {
  const slugs = [...Array.from({ length: K }, (_, i) => `bench-${i + 1}`), 'bench-probe']
  broker = await startMosquitto(slugs.map((b) => ({ id: `larkspur-${b}`, site: 'larkspur', booth: b, password: PASSWORD })))
  mqttPort = broker.port
  for (let i = 0; i < INSTANCES; i++) {
    const instanceEnv = { ...env, MQTT_URL: broker.url, MQTT_USERNAME: broker.appUser.username, MQTT_PASSWORD: broker.appUser.password, MQTT_SHARED_GROUP: 'ingest', MQTT_CLIENT_ID: `boothbeat-bench-${i}` }
    apps.push(await startAppProcess(instanceEnv, i === 0 ? port : await freePort()))
  }
  app = apps[0]!
} else {
  app = await startAppProcess(env, port)
  apps.push(app)
}
const pids = apps.map((a) => a.child.pid!)

function connect(slug: string): Promise<MqttClient> {
  return new Promise((resolve, reject) => {
    const c = mqtt.connect(`mqtt://127.0.0.1:${mqttPort}`, { username: `larkspur-${slug}`, password: PASSWORD, clientId: `larkspur-${slug}`, reconnectPeriod: 1000, protocolVersion: INSTANCES > 1 ? 5 : 4 })
    c.once('connect', () => resolve(c))
    c.once('error', reject)
  })
}

const base = Date.now() - 2 * 3600_000 // 1 ms apart per booth, well inside the accepted age
const payload = (i: number) =>
  `{"ts":"${new Date(base + i).toISOString()}","seq":${i},"airTempC":${(20 + (i % 50) / 10).toFixed(1)},"rhPct":55.0,"panelTempC":19.8,"airflowMps":0.41,"boothDpPa":6.5,"intakeFilterDpPa":95,"exhaustFilterDpPa":140,"heaterOn":false}`

const clients = await Promise.all(Array.from({ length: K }, (_, i) => connect(`bench-${i + 1}`)))
const probe = await connect('bench-probe')
const { rows: [probeBooth] } = await pool.query<{ id: number }>(`SELECT id FROM booths WHERE slug = 'bench-probe'`)

console.log(`ingest benchmark: ${K} devices × ${N.toLocaleString('en-US')} readings, QoS 1, window ${WINDOW} in flight per device, ${INSTANCES > 1 ? `${INSTANCES} instances on Mosquitto (shared subscription)` : 'one instance, embedded broker'}`)
let acked = 0
const started = performance.now()
const publishAll = clients.map(
  (c) =>
    new Promise<void>((done) => {
      let sent = 0
      let inflight = 0
      const pump = () => {
        while (inflight < WINDOW && sent < N) {
          inflight++
          c.publish('boothbeat/v1/larkspur/' + (c.options.clientId as string).replace('larkspur-', '') + '/reading', payload(sent++), { qos: 1 }, () => {
            inflight--
            acked++
            if (sent === N && inflight === 0) done()
            else pump()
          })
        }
      }
      pump()
    }),
)

// Probe: publish, then poll its primary key until the row is there.
const latencies: number[] = []
let probing = true
const probeLoop = (async () => {
  let i = 0
  while (probing) {
    const ts = new Date(Date.now() - 1000 + i++).toISOString()
    const t0 = performance.now()
    await probe.publishAsync('boothbeat/v1/larkspur/bench-probe/reading', `{"ts":"${ts}","airTempC":21}`, { qos: 1 })
    for (;;) {
      const r = await pool.query('SELECT 1 FROM readings WHERE booth_id = $1 AND ts = $2', [probeBooth!.id, ts])
      if (r.rowCount) break
      await new Promise((res) => setTimeout(res, 5))
    }
    latencies.push(performance.now() - t0)
    await new Promise((res) => setTimeout(res, 100))
  }
})()

const peakApp = pids.map(() => 0)
const sampler = setInterval(() => pids.forEach((p, i) => (peakApp[i] = Math.max(peakApp[i]!, memoryOf(p).rssMiB))), 200)
await Promise.all(publishAll)
const publishedMs = performance.now() - started
const expected = K * N
let stored = 0
for (;;) {
  const r = await pool.query<{ n: number }>(`SELECT count(*)::int AS n FROM readings WHERE booth_id <> $1`, [probeBooth!.id])
  stored = r.rows[0]!.n
  if (stored >= expected || performance.now() - started > publishedMs + 60_000) break
  await new Promise((res) => setTimeout(res, 50))
}
const storedMs = performance.now() - started
probing = false
await probeLoop
clearInterval(sampler)
const healths = (await Promise.all(apps.map(async (a) => (await fetch(`${a.url}/api/health`)).json()))) as { ingestion: { duplicates: number; rejected: number; stored: number } }[]
const health = { ingestion: { duplicates: healths.reduce((s, h) => s + h.ingestion.duplicates, 0), rejected: healths.reduce((s, h) => s + h.ingestion.rejected, 0) } }
const appMems = pids.map((p) => memoryOf(p))
const brokerPid = broker?.pid()
const brokerMem = brokerPid ? memoryOf(brokerPid) : undefined
const benchMem = memoryOf(process.pid)
await Promise.all([...clients, probe].map((c) => c.endAsync()))
await Promise.all(apps.map((a) => a.stop()))
await broker?.stop()

// Ceiling: the same number of rows with a server-side COPY into the same (emptied) table.
const csvPath = `/tmp/boothbeat-bench-${process.pid}.csv`
const lines: string[] = []
const { rows: booths } = await pool.query<{ id: number }>(`SELECT id FROM booths WHERE slug LIKE 'bench-%' AND slug <> 'bench-probe' ORDER BY id`)
for (const b of booths) for (let i = 0; i < N; i++) lines.push(`${b.id},${new Date(base + i).toISOString()},larkspur-bench,${i},${(20 + (i % 50) / 10).toFixed(1)},55,19.8,0.41,6.5,95,140,f,10.5`)
writeFileSync(csvPath, lines.join('\n') + '\n')
chmodSync(csvPath, 0o644)
await pool.query('TRUNCATE readings, readings_minute')
const c0 = performance.now()
await pool.query(`COPY readings (booth_id, ts, device_id, seq, air_temp_c, rh_pct, panel_temp_c, airflow_mps, booth_dp_pa, intake_filter_dp_pa, exhaust_filter_dp_pa, heater_on, dew_point_c) FROM '${csvPath}' WITH (FORMAT csv)`)
const copyMs = performance.now() - c0
rmSync(csvPath, { force: true })
await pool.end()

const rate = (stored / storedMs) * 1000
const copyRate = (expected / copyMs) * 1000
console.log(`
  published and acknowledged   ${fmt(acked)} readings in ${fmt(publishedMs / 1000, 2)} s
  stored                       ${fmt(stored)} of ${fmt(expected)} in ${fmt(storedMs / 1000, 2)} s
  sustained                    ${fmt(rate)} readings/s   (target ≥ 20,000)
  publish-to-row latency       p50 ${fmt(percentile(latencies, 50))} ms, p99 ${fmt(percentile(latencies, 99))} ms, max ${fmt(Math.max(...latencies))} ms (${latencies.length} probes; target p99 < 1,000 ms)
  lost                         ${fmt(expected - stored)}
  duplicated                   ${fmt(stored - Math.min(stored, expected))} rows stored twice; ${fmt(health.ingestion.duplicates)} redeliveries skipped by the key
  rejected                     ${fmt(health.ingestion.rejected)}
${apps.map((_, i) => `  app ${INSTANCES > 1 ? `#${i + 1} (subscriber)` : '(broker+subscriber)'} RSS ${fmt(appMems[i]!.rssMiB)} MiB now, ${fmt(Math.max(peakApp[i]!, appMems[i]!.peakMiB))} MiB peak${INSTANCES > 1 ? `, stored ${fmt(healths[i]!.ingestion.stored)}` : ''}`).join('\n')}
${brokerMem ? `  Mosquitto RSS                ${fmt(brokerMem.rssMiB)} MiB (peak ${fmt(brokerMem.peakMiB)} MiB)\n` : ''}  bench publisher RSS          ${fmt(benchMem.rssMiB)} MiB (peak ${fmt(benchMem.peakMiB)} MiB)
  COPY ceiling                 ${fmt(copyRate)} rows/s (${fmt(copyMs)} ms for ${fmt(expected)} rows)
  pipeline / COPY              ${fmt((rate / copyRate) * 100, 1)} %
  watches and alerts           ${env.BOOTHBEAT_ALERTS}
`)
process.exit(expected - stored === 0 ? 0 : 1)
