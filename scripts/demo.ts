import { spawn } from 'node:child_process'
import { resolve } from 'node:path'
import { ensureBuilt, SERVER_ENTRY } from './lib/build'
import { demoPostgres, ensureGenerated, loadEnv } from './lib/env'
import { waitForHttp } from './lib/ports'
import { startPostgres, stopPostgres } from './lib/postgres'

// npm run demo — the whole product on one machine: private PostgreSQL (unless DATABASE_URL), the
// build, the app with the embedded broker and the invented demo shop, the SMTP sink and the
// simulator. Ctrl-C stops everything it started.
loadEnv()
const sessionPassword = ensureGenerated('NUXT_SESSION_PASSWORD', 32)
const demoPassword = ensureGenerated('DEMO_PASSWORD', 9)
const devicePassword = ensureGenerated('DEMO_DEVICE_PASSWORD', 12)
const port = Number(process.env.PORT ?? 3000)
const mqttPort = Number(process.env.MQTT_PORT ?? 1883)
const smtpPort = Number(new URL(process.env.SMTP_URL ?? 'smtp://127.0.0.1:2525').port || 2525)
const speed = Number(process.env.DEMO_SPEED ?? 30)

const startedPg = !process.env.DATABASE_URL
const databaseUrl = process.env.DATABASE_URL ?? (await startPostgres(demoPostgres())).url
ensureBuilt()

const stops: (() => Promise<void> | void)[] = []
let mailboxDir = process.env.MAILBOX_DIR ?? 'var/mailbox'
if (!process.env.SMTP_URL) {
  // The local stand-in for a mail server; the app's mailbox page shows what it received.
  try {
    const { startSmtpSink } = await import('./lib/smtp-sink')
    const sink = await startSmtpSink({ host: '127.0.0.1', port: smtpPort, dir: resolve(mailboxDir) })
    stops.push(() => sink.close())
    console.log(`[smtp] sink on 127.0.0.1:${smtpPort}, messages in ${mailboxDir}`)
  } catch (e) {
    console.warn('[smtp] sink not started:', e instanceof Error ? e.message : e)
  }
}
mailboxDir = resolve(mailboxDir)

const env = {
  ...process.env,
  NODE_ENV: 'production',
  HOST: process.env.HOST ?? '127.0.0.1',
  PORT: String(port),
  MQTT_PORT: String(mqttPort),
  DATABASE_URL: databaseUrl,
  NUXT_SESSION_PASSWORD: sessionPassword,
  DEMO_SEED: '1',
  DEMO_PASSWORD: demoPassword,
  DEMO_DEVICE_PASSWORD: devicePassword,
  SMTP_URL: process.env.SMTP_URL ?? `smtp://127.0.0.1:${smtpPort}`,
  MAILBOX_DIR: mailboxDir,
  MAILBOX_PAGE: process.env.MAILBOX_PAGE ?? '1',
  PUBLIC_URL: process.env.PUBLIC_URL ?? `http://127.0.0.1:${port}`,
}
const app = spawn(process.execPath, [resolve(SERVER_ENTRY)], { env, stdio: 'inherit' })
let stopping = false
app.on('exit', (code) => {
  if (!stopping) {
    console.error(`[demo] the app stopped (exit ${code})`)
    void shutdown(1)
  }
})
stops.push(
  () =>
    new Promise<void>((done) => {
      if (app.exitCode !== null) return done()
      app.once('exit', () => done())
      app.kill('SIGTERM')
    }),
)

const base = `http://127.0.0.1:${port}`
await waitForHttp(`${base}/api/health`, 120_000)

// Before the live simulator starts, so Downdraft booth 2 has no running bake yet.
if (process.env.DEMO_HISTORY !== 'off') {
  const { seedFinishedJob } = await import('./lib/demo-history')
  await seedFinishedJob({ baseUrl: base, databaseUrl, password: demoPassword, log: (l) => console.log(l) }).catch((e: unknown) =>
    console.warn('[history] the finished demo job was not created:', e instanceof Error ? e.message : e),
  )
}

if (!process.env.MQTT_URL && process.env.DEMO_SIMULATOR !== 'off') {
  const { startSimulator } = await import('../simulator/publisher')
  const sim = startSimulator({
    url: `mqtt://127.0.0.1:${mqttPort}`,
    booths: 3,
    speed,
    seed: Number(process.env.DEMO_SEED_NUMBER ?? 7),
    password: devicePassword,
    humidityDriftPct: Number(process.env.DEMO_HUMIDITY_DRIFT ?? 4),
    // The demo's weather: steady outside air (a small daily swing and random walk, so ×30 time compression does
    // not turn it into noise) with a humid spell every ~50 minutes: it rises 10 points in about 5 minutes, stays
    // 2 minutes and goes. Every booth sees it through its air intake; the drift watches open within about 10
    // minutes and resolve about 20–35 minutes in, once the booths are back at their usual level.
    model: {
      humidityMeanPct: 58,
      humidityDailyAmplitudePct: 1.5,
      humidityWalkSdPct: 1,
      humidityDriftEpisodes: { peakPct: Number(process.env.DEMO_HUMIDITY_DRIFT_PEAK ?? 10), holdHours: 1, restHours: 20 },
    },
    log: (line: string) => console.log(`[simulator] ${line}`),
    summaryIntervalMs: 60_000,
  })
  stops.unshift(() => sim.stop())
}

console.log(`
  Boothbeat demo — Larkspur Collision & Refinish (invented)
  App:      ${base}
  Accounts: admin@, manager@, tech@, painter@, auditor@larkspur.example
  Password: ${demoPassword}        (DEMO_PASSWORD in .env)
  Devices:  username larkspur-<booth>, password ${devicePassword}  (DEMO_DEVICE_PASSWORD)
  Broker:   mqtt://127.0.0.1:${mqttPort}    Mail sink: smtp://127.0.0.1:${smtpPort} → /admin/mailbox
  Simulator speed ×${speed}. Ctrl-C stops it all.
`)

async function shutdown(code = 0) {
  if (stopping) return
  stopping = true
  for (const s of stops) await Promise.resolve(s()).catch(() => undefined)
  if (startedPg && process.env.DEMO_KEEP_PG !== '1') stopPostgres(demoPostgres().dataDir)
  process.exit(code)
}
process.on('SIGINT', () => void shutdown(0))
process.on('SIGTERM', () => void shutdown(0))
