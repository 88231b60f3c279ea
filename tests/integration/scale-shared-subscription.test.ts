import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import mqtt, { type MqttClient } from 'mqtt'
import { DEVICE_PASSWORD, startTestApp, type TestApp } from '../support/app'
import { startMosquitto, type Mosquitto } from '../support/mosquitto'
import { reading, topicOf, waitUntil } from '../support/mqtt'

// Past one machine: Debian's Mosquitto as the external broker, two app instances that split the
// stream through a shared subscription. Every reading is stored exactly once, and a live screen on
// either instance sees every reading of its booth.
const BOOTHS = ['downdraft-1', 'downdraft-2', 'prep-deck']
let broker: Mosquitto
let a: TestApp
let b: TestApp

beforeAll(async () => {
  broker = await startMosquitto(BOOTHS.map((booth) => ({ id: `larkspur-${booth}`, site: 'larkspur', booth, password: DEVICE_PASSWORD })))
  const env = (id: string) => ({
    MQTT_URL: broker.url,
    MQTT_USERNAME: broker.appUser.username,
    MQTT_PASSWORD: broker.appUser.password,
    MQTT_SHARED_GROUP: 'ingest',
    MQTT_CLIENT_ID: `boothbeat-test-${id}`,
  })
  a = await startTestApp(env('a'))
  b = await startTestApp(env('b'), { shareDatabaseOf: a })
}, 180_000)
afterAll(async () => {
  await b?.stop()
  await b?.db.destroy()
  await a?.close()
  await broker?.stop()
})

function device(booth: string): Promise<MqttClient> {
  return new Promise((resolve, reject) => {
    const c = mqtt.connect(broker.url, { username: `larkspur-${booth}`, password: DEVICE_PASSWORD, clientId: `larkspur-${booth}`, protocolVersion: 5, reconnectPeriod: 0 })
    c.once('connect', () => resolve(c))
    c.once('error', reject)
  })
}

async function liveReadings(app: TestApp, boothId: number, into: Set<string>, signal: AbortSignal) {
  const c = await app.as('manager')
  const res = await fetch(`${app.url}/api/booths/${boothId}/live`, { headers: { cookie: c.cookie }, signal })
  const reader = res.body!.getReader()
  let buf = ''
  for (;;) {
    const { value, done } = await reader.read().catch(() => ({ value: undefined, done: true }))
    if (done) return
    buf += new TextDecoder().decode(value)
    const parts = buf.split('\n\n')
    buf = parts.pop() ?? ''
    for (const p of parts) {
      const data = p.split('\n').find((l) => l.startsWith('data: '))
      if (p.includes('event: booth') && data) {
        const ts = (JSON.parse(data.slice(6)) as { reading?: { ts?: string } }).reading?.ts
        if (ts) into.add(ts)
      }
    }
  }
}

describe('two instances on an external broker', () => {
  it('store every reading exactly once between them, and both live screens see the booth', async () => {
    const boothId = (await a.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
    const seenA = new Set<string>()
    const seenB = new Set<string>()
    const stop = new AbortController()
    void liveReadings(a, boothId, seenA, stop.signal)
    void liveReadings(b, boothId, seenB, stop.signal)
    await new Promise((r) => setTimeout(r, 500))

    const clients = await Promise.all(BOOTHS.map(device))
    const perBooth = 400
    const t0 = Date.now() - 30 * 60_000
    const live: string[] = []
    for (let i = 0; i < perBooth; i++) {
      await Promise.all(
        clients.map((c, k) => {
          const ts = t0 + i * 1000
          if (k === 0 && i >= perBooth - 5) live.push(new Date(ts).toISOString())
          return c.publishAsync(topicOf(BOOTHS[k]!), reading(ts, { seq: i }), { qos: 1 })
        }),
      )
      // The last few of booth 1 slowly, so the twice-a-second live throttle shows each of them.
      if (i >= perBooth - 6) await new Promise((r) => setTimeout(r, 600))
    }
    const expected = perBooth * BOOTHS.length
    await waitUntil(async () => {
      const r = await a.db.selectFrom('readings').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
      return Number(r.n) === expected
    }, 30_000)
    await new Promise((r) => setTimeout(r, 1_000))
    const total = Number((await a.db.selectFrom('readings').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()).n)
    expect(total).toBe(expected)

    const ha = await (await fetch(`${a.url}/api/health`)).json()
    const hb = await (await fetch(`${b.url}/api/health`)).json()
    // Both took a share of the stream, and together exactly all of it (none twice).
    expect(ha.ingestion.stored).toBeGreaterThan(0)
    expect(hb.ingestion.stored).toBeGreaterThan(0)
    expect(ha.ingestion.stored + hb.ingestion.stored).toBe(expected)
    expect(ha.ingestion.duplicates + hb.ingestion.duplicates).toBe(0)

    await waitUntil(async () => live.every((ts) => seenA.has(ts) && seenB.has(ts)), 10_000)
    stop.abort()
    await Promise.all(clients.map((c) => c.endAsync()))
  })
})
