import mqtt from 'mqtt'
import pg from 'pg'
import { ensureBuilt } from '../scripts/lib/build'
import { freePort } from '../scripts/lib/ports'
import { startPostgres } from '../scripts/lib/postgres'
import { chromiumMemory, openBrowser } from '../tests/support/browser'
import { startAppProcess, memoryOf } from './lib/app-process'
import { fmt, percentile } from './lib/stats'

// npm run bench:screen -- [--readings N] [--interval-ms MS] [--jitter-ms MS]
// Publish-to-screen latency: the built server on a fresh database of the private bench cluster (.data/pg-bench,
// port 54331) with the demo shop, a booth screen paired in Debian's Chromium (the pairing-code form, as a shop
// tablet does), and N readings of Downdraft booth 1 published over MQTT (QoS 1), each with a distinct air
// temperature. A MutationObserver in the page stamps each new value shown in the "Air" tile with
// performance.timeOrigin + performance.now(); this script stamps each publish with the same clock (Node's
// performance.timeOrigin + performance.now(), both from this machine's clock; the offset between the two is
// measured by round trips and taken out). Latency = shown − published.
//
// What to expect: the screen's state is recomputed at most every 2 s per booth and 600 ms after a live reading
// (server/domain/booth-screen.ts: MIN_RECOMPUTE_MS, SETTLE_MS), so with readings further apart than 2 s the figure is
// about 0.6 s plus ingest, the recomputation, SSE and rendering, and up to about 2 s more for a reading that comes
// soon after the 10 s heartbeat recomputation (HEARTBEAT_MS) took the throttle's slot. With readings closer together (a booth sends one a
// second), values in between are superseded and never shown: they are counted as "not shown", not as latency.
const arg = (name: string, dflt: number) => {
  const i = process.argv.indexOf(`--${name}`)
  return i > 0 ? Number(process.argv[i + 1]) : dflt
}
const N = arg('readings', 50)
const INTERVAL_MS = arg('interval-ms', 2_500)
const JITTER_MS = arg('jitter-ms', 500)
const DEMO_PASSWORD = 'bench-demo-password'
const DEVICE_PASSWORD = 'bench-device-password'
const BOOTH = 'downdraft-1'

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))
const now = () => performance.timeOrigin + performance.now()
// Distinct temperatures shown with one decimal: 15.0 … 29.9 °C, visited in a scattered order (7 and 150 are
// coprime, so 150 readings in a row never repeat a value and neighbours always differ).
const valueOf = (i: number) => 15 + ((i * 7) % 150) / 10

ensureBuilt()
const cluster = await startPostgres({ dataDir: '.data/pg-bench', port: Number(process.env.BENCH_PG_PORT ?? 54331), database: 'postgres' })
const dbName = `bench_screen_${Date.now().toString(36)}`
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
    DEMO_PASSWORD,
    DEMO_DEVICE_PASSWORD: DEVICE_PASSWORD,
    INGEST_SPOOL_DIR: `/tmp/boothbeat-bench-spool-${process.pid}`,
    UPLOAD_DIR: `/tmp/boothbeat-bench-uploads-${process.pid}`,
    SMTP_URL: 'smtp://127.0.0.1:9',
  },
  port,
)
const appPid = app.child.pid!
const browser = await openBrowser({ width: 1600, height: 1000 })
const device = await mqtt.connectAsync(`mqtt://127.0.0.1:${mqttPort}`, { username: `larkspur-${BOOTH}`, password: DEVICE_PASSWORD, clientId: `bench-screen-${process.pid}`, reconnectPeriod: 0 })
const topic = `boothbeat/v1/larkspur/${BOOTH}/reading`
const publish = (airTempC: number) =>
  device.publishAsync(topic, JSON.stringify({ ts: new Date().toISOString(), airTempC, rhPct: 50, panelTempC: 20, airflowMps: 0.4, boothDpPa: 6 }), { qos: 1 })

let exitCode = 0
try {
  // ── pair the screen ─────────────────────────────────────────────────────────────────────────────
  const login = await fetch(`${app.url}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: 'manager@larkspur.example', password: DEMO_PASSWORD }) })
  if (login.status !== 200) throw new Error(`manager login: HTTP ${login.status}`)
  const cookie = login.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')
  const booths = (await (await fetch(`${app.url}/api/booths`, { headers: { cookie } })).json()) as { booths: { id: number; slug?: string; name: string }[] }
  const booth = booths.booths.find((b) => b.slug === BOOTH || b.name === 'Downdraft booth 1')
  if (!booth) throw new Error(`no booth ${BOOTH}`)
  const issued = await fetch(`${app.url}/api/booths/${booth.id}/pairing-codes`, { method: 'POST', headers: { cookie } })
  if (issued.status !== 200 && issued.status !== 201) throw new Error(`pairing code: HTTP ${issued.status}`)
  const { code } = (await issued.json()) as { code: string }
  const page = browser.page
  await page.goto(`${app.url}/screen`)
  await page.getByTestId('pair-code').fill(code)
  await page.getByTestId('pair-submit').click()
  await page.getByTestId('screen-value-air').waitFor({ timeout: 30_000 })
  // A first reading, and wait until it is on screen: the stream is open and the code is warm.
  await publish(14.9)
  await page.getByTestId('screen-value-air').getByText('14.9').waitFor({ timeout: 30_000 })

  // ── clocks: the page's epoch-based clock against ours ───────────────────────────────────────────
  let offsetMs = 0
  let bestRtt = Infinity
  for (let i = 0; i < 20; i++) {
    const t0 = now()
    const b = await page.evaluate(() => performance.timeOrigin + performance.now())
    const t1 = now()
    if (t1 - t0 < bestRtt) {
      bestRtt = t1 - t0
      offsetMs = b - (t0 + t1) / 2
    }
  }

  // ── observe the Air tile ────────────────────────────────────────────────────────────────────────
  // A string, not a function: tsx (esbuild keepNames) would wrap named functions in a __name helper the page lacks.
  // The whole screen is watched (a re-render may replace the tile); each change of the Air text is stamped once.
  await page.evaluate(`(() => {
    window.__shown = []
    const tile = () => document.querySelector('[data-testid="screen-value-air"] dd')
    let last = tile()?.textContent ?? ''
    new MutationObserver(() => {
      const text = tile()?.textContent ?? ''
      if (text === last) return
      last = text
      window.__shown.push({ text, at: performance.timeOrigin + performance.now() })
    }).observe(document.body, { subtree: true, childList: true, characterData: true })
  })()`)

  // ── publish, sampling memory meanwhile ──────────────────────────────────────────────────────────
  let browserPeakPssMiB = 0
  let browserPeakRssMiB = 0
  let browserProcesses = 0
  let appPeakRssMiB = 0
  const sample = () => {
    const b = chromiumMemory(browser)
    browserPeakRssMiB = Math.max(browserPeakRssMiB, b.rssMiB)
    if (b.pssMiB > browserPeakPssMiB) {
      browserPeakPssMiB = b.pssMiB
      browserProcesses = b.processes
    }
    appPeakRssMiB = Math.max(appPeakRssMiB, memoryOf(appPid).rssMiB)
  }
  const sampler = setInterval(sample, 200)
  console.log(`screen latency benchmark: ${N} readings over MQTT, one every ${INTERVAL_MS}–${INTERVAL_MS + JITTER_MS} ms, to a paired booth screen in Chromium`)
  const published: { value: number; at: number }[] = []
  for (let i = 0; i < N; i++) {
    const value = valueOf(i)
    const at = now()
    await publish(value)
    published.push({ value, at })
    await sleep(INTERVAL_MS + Math.random() * JITTER_MS)
  }
  await sleep(3_000)
  clearInterval(sampler)
  sample()
  const shown = await page.evaluate(() => (window as unknown as { __shown: { text: string; at: number }[] }).__shown)
  // performance.memory (Chromium only) has its numbers as getters: copy them out, or they do not serialize.
  const heap = await page.evaluate('(() => { const m = performance.memory; return m ? { used: m.usedJSHeapSize, total: m.totalJSHeapSize } : null })()') as { used: number; total: number } | null
  const appMem = memoryOf(appPid)

  // ── match each publish to the first time its value was shown after it ───────────────────────────
  const latencies: number[] = []
  let notShown = 0
  for (let i = 0; i < published.length; i++) {
    const p = published[i]!
    const hit = shown.find((s) => s.at - offsetMs >= p.at && Math.abs(parseFloat(s.text) - p.value) < 0.05)
    // A value seen only after the next one was published still counts: it was late, not lost.
    if (hit) latencies.push(hit.at - offsetMs - p.at)
    else notShown++
  }
  const mean = latencies.reduce((a, b) => a + b, 0) / (latencies.length || 1)
  console.log('')
  console.log(`  clock offset page − node   ${fmt(offsetMs, 2)} ms (best round trip ${fmt(bestRtt, 2)} ms), taken out`)
  console.log(`  readings published         ${fmt(published.length)}`)
  console.log(`  shown on screen            ${fmt(latencies.length)}${notShown ? `  (${fmt(notShown)} not shown: superseded or lost)` : ''}`)
  console.log(`  latency min                ${fmt(Math.min(...latencies))} ms`)
  console.log(`  latency p50                ${fmt(percentile(latencies, 50))} ms`)
  console.log(`  latency p95                ${fmt(percentile(latencies, 95))} ms`)
  console.log(`  latency p99                ${fmt(percentile(latencies, 99))} ms`)
  console.log(`  latency max                ${fmt(Math.max(...latencies))} ms`)
  console.log(`  latency mean               ${fmt(mean)} ms`)
  console.log(`  browser memory peak        ${fmt(browserPeakPssMiB, 1)} MiB PSS over ${browserProcesses} Chromium processes (${fmt(browserPeakRssMiB, 1)} MiB as a plain RSS sum; sampled every 200 ms)`)
  if (heap) console.log(`  page JS heap at the end    ${fmt(heap.used / 1024 / 1024, 1)} MiB used of ${fmt(heap.total / 1024 / 1024, 1)} MiB`)
  console.log(`  app RSS peak               ${fmt(appMem.peakMiB, 1)} MiB (VmHWM; ${fmt(appPeakRssMiB, 1)} MiB sampled during the run)`)
  if (!latencies.length) {
    console.log('\n  FAIL: no published value appeared on the screen')
    exitCode = 1
  }
} catch (e) {
  console.error(e)
  exitCode = 1
} finally {
  await device.endAsync().catch(() => undefined)
  await browser.close()
  await app.stop()
  const drop = new pg.Client({ connectionString: cluster.url })
  await drop.connect()
  await drop.query(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`)
  await drop.end()
}
process.exit(exitCode)
