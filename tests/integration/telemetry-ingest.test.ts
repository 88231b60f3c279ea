import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import mqtt from 'mqtt'
import { startTestApp, type TestApp } from '../support/app'
import { connectDevice, reading, topicOf, waitUntil } from '../support/mqtt'

let app: TestApp
let boothId: number
beforeAll(async () => {
  app = await startTestApp()
  boothId = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
})
afterAll(async () => {
  await app?.close()
})

const countRows = async (id: number) =>
  Number((await app.db.selectFrom('readings').select((eb) => eb.fn.countAll<number>().as('n')).where('booth_id', '=', id).executeTakeFirstOrThrow()).n)

describe('ingestion through the embedded broker', () => {
  it('stores a reading a device publishes, with the derived dew point', async () => {
    const c = await connectDevice(app.mqttUrl, 'downdraft-1')
    const ts = Date.now() - 1_000
    await c.publishAsync(topicOf('downdraft-1'), reading(ts, { airTempC: 20, rhPct: 50 }), { qos: 1 })
    const row = await waitUntil(() => app.db.selectFrom('readings').selectAll().where('booth_id', '=', boothId).where('ts', '=', new Date(ts)).executeTakeFirst())
    expect(row.air_temp_c).toBeCloseTo(20, 5)
    // 20 °C at 50 % RH: dew point ≈ 9.3 °C (Magnus form, Alduchov & Eskridge 1996 constants).
    expect(row.dew_point_c).toBeCloseTo(9.26, 1)
    await c.endAsync()
  })

  it('stores a redelivered message (same booth and device timestamp) once', async () => {
    const c = await connectDevice(app.mqttUrl, 'downdraft-1')
    const ts = Date.now() - 2_500
    const before = await countRows(boothId)
    for (let i = 0; i < 3; i++) await c.publishAsync(topicOf('downdraft-1'), reading(ts), { qos: 1 })
    await c.publishAsync(topicOf('downdraft-1'), reading(ts + 1), { qos: 1 })
    await waitUntil(async () => (await countRows(boothId)) === before + 2)
    await new Promise((r) => setTimeout(r, 600))
    expect(await countRows(boothId)).toBe(before + 2)
    await c.endAsync()
  })

  it('refuses wrong credentials and revoked devices at sign-in', async () => {
    await expect(connectDevice(app.mqttUrl, 'downdraft-1', { password: 'not-the-password' })).rejects.toThrow(/Bad username or password|Not authorized/i)
    await expect(connectDevice(app.mqttUrl, 'downdraft-1', { username: 'larkspur-nonexistent' })).rejects.toThrow()
  })

  it("does not let a device publish under another booth's topic", async () => {
    const other = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-2').executeTakeFirstOrThrow()).id
    const before = await countRows(other)
    const c = await connectDevice(app.mqttUrl, 'downdraft-1')
    const closed = new Promise<void>((r) => c.once('close', () => r()))
    c.publish(topicOf('downdraft-2'), reading(Date.now() - 500), { qos: 1 })
    await closed // aedes drops a client whose publish is not authorised
    c.end(true)
    await new Promise((r) => setTimeout(r, 700))
    expect(await countRows(other)).toBe(before)
  })

  it("refuses a device's subscription to another booth and to $SYS", async () => {
    const c = await connectDevice(app.mqttUrl, 'downdraft-1')
    // A refused subscription comes back with return code 128, which mqtt.js raises as an error.
    await expect(c.subscribeAsync(topicOf('downdraft-2'), { qos: 1 })).rejects.toThrow(/Subscribe error/)
    await expect(c.subscribeAsync('$SYS/#', { qos: 0 })).rejects.toThrow(/Subscribe error/)
    await expect(c.subscribeAsync('boothbeat/#', { qos: 0 })).rejects.toThrow(/Subscribe error/)
    const own = await c.subscribeAsync('boothbeat/v1/larkspur/downdraft-1/control', { qos: 1 })
    expect(own[0]?.qos).toBe(1)
    await c.endAsync()
  })

  it('rejects and counts each class of bad message while storing the good ones around them', async () => {
    const prep = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'prep-deck').executeTakeFirstOrThrow()).id
    const c = await connectDevice(app.mqttUrl, 'prep-deck')
    const now = Date.now()
    const bad: [string, string][] = [
      ['malformed_json', '{"ts": "2026-'],
      ['wrong_types', JSON.stringify({ ts: new Date(now).toISOString(), airTempC: 'warm' })],
      ['wrong_types', JSON.stringify({ airTempC: 20 })],
      ['not_finite', `{"ts":"${new Date(now - 100).toISOString()}","airTempC":1e999}`],
      ['out_of_range', reading(now - 200, { rhPct: 140 })],
      ['out_of_range', reading(now - 300, { airTempC: 400 })],
      ['out_of_range', reading(now - 400, { airflowMps: -1 })],
      ['ts_future', reading(now + 10 * 60_000)],
      ['ts_too_old', reading(now - 30 * 86_400_000)],
      ['too_large', JSON.stringify({ ts: new Date(now - 500).toISOString(), note: 'x'.repeat(9000) })],
    ]
    const before = await countRows(prep)
    let good = 0
    for (const [, payload] of bad) {
      await c.publishAsync(topicOf('prep-deck'), reading(now - 10_000 - good * 1000), { qos: 1 })
      good++
      await c.publishAsync(topicOf('prep-deck'), payload, { qos: 1 })
    }
    await c.publishAsync(topicOf('prep-deck'), reading(now - 10_000 - good * 1000), { qos: 1 })
    good++
    await waitUntil(async () => (await countRows(prep)) === before + good)
    const counts = await waitUntil(async () => {
      const rows = await app.db.selectFrom('rejected_counts').selectAll().where('booth_key', '=', String(prep)).execute()
      const total = rows.reduce((s, r) => s + Number(r.count), 0)
      return total >= bad.length ? rows : undefined
    })
    const byReason = Object.fromEntries(counts.map((r) => [r.reason, Number(r.count)]))
    const expected: Record<string, number> = {}
    for (const [reason] of bad) expected[reason] = (expected[reason] ?? 0) + 1
    expect(byReason).toEqual(expected)
    const sample = await app.db.selectFrom('rejected_readings').selectAll().where('booth_id', '=', prep).execute()
    expect(sample.length).toBe(bad.length)
    expect(sample.find((s) => s.reason === 'too_large')!.payload.length).toBeLessThanOrEqual(2048)
    const health = await (await fetch(`${app.url}/api/health`)).json()
    expect(health.ingestion.rejectedByReason.out_of_range).toBeGreaterThanOrEqual(3)
    await c.endAsync()
  })
})

describe('live stream and history', () => {
  it('delivers a published reading over Server-Sent Events', async () => {
    const c = await app.as('painter')
    const controller = new AbortController()
    const res = await fetch(`${app.url}/api/booths/${boothId}/live`, { headers: { cookie: c.cookie }, signal: controller.signal })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/text\/event-stream/)
    const reader = res.body!.getReader()
    const device = await connectDevice(app.mqttUrl, 'downdraft-1')
    const ts = Date.now() - 100
    await device.publishAsync(topicOf('downdraft-1'), reading(ts, { airTempC: 23.25 }), { qos: 1 })
    let text = ''
    const deadline = Date.now() + 10_000
    while (!text.includes('23.25') && Date.now() < deadline) {
      const { value, done } = await reader.read()
      if (done) break
      text += new TextDecoder().decode(value)
    }
    controller.abort()
    await device.endAsync()
    const events = text.split('\n\n').filter((e) => e.includes('event: booth'))
    const last = events.find((e) => e.includes('23.25'))!
    const data = JSON.parse(last.split('\n').find((l) => l.startsWith('data: '))!.slice(6))
    expect(data).toMatchObject({ boothId, stale: false, reading: { airTempC: 23.25, ts: new Date(ts).toISOString() } })
    expect(data.reading.dewPointMarginC).toEqual(expect.any(Number))
  })

  it('lists booths with topic, device id and the latest reading (public contract)', async () => {
    const c = await app.as('auditor')
    const r = await c.get<{ booths: { id: number; topic: string; deviceId: string; latest: { dewPointC: number } | null }[] }>('/api/booths')
    expect(r.status).toBe(200)
    const b = r.body.booths.find((x) => x.id === boothId)!
    expect(b).toMatchObject({ topic: 'boothbeat/v1/larkspur/downdraft-1/reading', deviceId: 'larkspur-downdraft-1' })
    expect(b.latest?.dewPointC).toEqual(expect.any(Number))
  })
})
