import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { MqttClient } from 'mqtt'
import { sql } from 'kysely'
import { startTestApp, type TestApp } from '../support/app'
import type { ApiClient } from '../support/http'
import { connectDevice, reading, topicOf, waitUntil } from '../support/mqtt'

// Watches on the ingest path, end to end: recorded sequences go through the broker with device timestamps in the
// past, so minutes of booth time pass in a second of test time.

const S = 1000
const MIN = 60 * S

let app: TestApp
let manager: ApiClient
const ids: Record<string, number> = {}
const devices: Record<string, MqttClient> = {}

interface AlertBody {
  id: number
  boothId: number
  ruleId: string
  kind: string
  state: string
  value: number | null
  limit: number | null
  peak: number | null
  openedAt: string
  clearedAt: string | null
  resolution: string | null
  acknowledgedBy: { name: string } | null
  acknowledgeNote: string | null
  resolvedBy: { name: string } | null
  resolveNote: string | null
  durationMs: number
  message: string
  severity: string
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))

async function device(booth: string): Promise<MqttClient> {
  if (!devices[booth] || !devices[booth].connected) devices[booth] = await connectDevice(app.mqttUrl, booth)
  return devices[booth]
}

async function alertsUp(a: TestApp) {
  await waitUntil(async () => {
    const h = (await (await fetch(`${a.url}/api/health`)).json()) as { components?: { alerts?: { up?: boolean } } }
    return h.components?.alerts?.up === true
  }, 30_000)
}

async function setWatches(boothId: number, watches: unknown[]) {
  const r = await manager.request('PUT', `/api/watches/${boothId}`, { watches })
  expect(r.status, JSON.stringify(r.body)).toBe(200)
  return r.body
}

async function setMode(booth: string, mode: string, tsMs: number) {
  const c = await device(booth)
  await c.publishAsync(topicOf(booth, 'mode'), JSON.stringify({ ts: new Date(tsMs).toISOString(), mode }), { qos: 1 })
  await waitUntil(() =>
    app.db.selectFrom('booth_modes').select('mode').where('booth_id', '=', ids[booth]!).where('ts', '=', new Date(tsMs)).executeTakeFirst(),
  )
}

/** Publishes readings at the given device times and waits until all are stored (so all were evaluated). */
async function publish(booth: string, points: { t: number; extra?: Record<string, unknown> }[]) {
  const c = await device(booth)
  for (const p of points) await c.publishAsync(topicOf(booth), reading(p.t, p.extra), { qos: 1 })
  const from = new Date(Math.min(...points.map((p) => p.t)))
  const to = new Date(Math.max(...points.map((p) => p.t)))
  await waitUntil(async () => {
    const r = await app.db
      .selectFrom('readings')
      .select((eb) => eb.fn.countAll<number>().as('n'))
      .where('booth_id', '=', ids[booth]!)
      .where('ts', '>=', from)
      .where('ts', '<=', to)
      .executeTakeFirstOrThrow()
    return Number(r.n) >= points.length
  })
}

const series = (from: number, to: number, step: number, extra: (t: number) => Record<string, unknown>) => {
  const out: { t: number; extra: Record<string, unknown> }[] = []
  for (let t = from; t <= to; t += step) out.push({ t, extra: extra(t) })
  return out
}

/** Lets the 1 s drain store what the evaluator queued. */
const settle = () => sleep(1_600)

async function alertsOf(booth: string, ruleId?: string): Promise<AlertBody[]> {
  const r = await manager.get<{ alerts: AlertBody[] }>(`/api/alerts?boothId=${ids[booth]}`)
  expect(r.status).toBe(200)
  return r.body.alerts.filter((a) => !ruleId || a.ruleId === ruleId)
}

beforeAll(async () => {
  app = await startTestApp({ ALERT_ESCALATE_AFTER_SEC: '3600' })
  await alertsUp(app)
  for (const b of await app.db.selectFrom('booths').select(['id', 'slug']).execute()) ids[b.slug] = b.id
  manager = await app.as('manager')
})

afterAll(async () => {
  for (const d of Object.values(devices)) await d.endAsync().catch(() => undefined)
  await app?.close()
})

describe('watch sets', () => {
  it('start at the shop defaults, and only managers may change them, validated field by field', async () => {
    const painter = await app.as('painter')
    const auditor = await app.as('auditor')
    const got = await painter.get<{ source: string; watches: { id: string; kind: string }[] }>(`/api/watches/${ids['prep-deck']}`)
    expect(got.status).toBe(200)
    expect(got.body.source).toBe('defaults')
    expect(got.body.watches.map((w) => w.kind)).toEqual(
      expect.arrayContaining(['rh_band', 'air_temp_band', 'dew_point_margin', 'airflow_min_in_spray', 'booth_pressure_band', 'filter_dp_max', 'sensor_silence', 'bake_not_reaching_temp', 'rh_cusum']),
    )
    // A prep deck's defaults are its kind's: lower airflow and pressure than a downdraft booth's.
    const prep = got.body.watches as unknown as { id: string; params: Record<string, number> }[]
    expect(prep.find((w) => w.id === 'booth-pressure')?.params).toEqual({ lowPa: 0.5, highPa: 10 })
    const downdraft = (await painter.get<{ watches: { id: string; params: Record<string, number> }[] }>(`/api/watches/${ids['downdraft-1']}`)).body
    expect(downdraft.watches.find((w) => w.id === 'booth-pressure')?.params).toEqual({ lowPa: 2, highPa: 15 })
    const byQuery = await auditor.get<{ source: string }>(`/api/watches?boothId=${ids['prep-deck']}`)
    expect(byQuery.body.source).toBe('defaults')

    const rule = { id: 'rh', kind: 'rh_band', params: { lowPct: 45, highPct: 65 } }
    expect((await painter.request('PUT', `/api/watches/${ids['prep-deck']}`, { watches: [rule] })).status).toBe(403)
    expect((await auditor.request('PUT', `/api/watches/${ids['prep-deck']}`, { watches: [rule] })).status).toBe(403)
    expect((await (await app.as('tech')).request('PUT', `/api/watches/${ids['prep-deck']}`, { watches: [rule] })).status).toBe(403)

    const bad = await manager.request<{ issues: { path: string; message: string }[] }>('PUT', `/api/watches/${ids['prep-deck']}`, {
      watches: [{ id: 'rh', kind: 'rh_band', params: { lowPct: 70, highPct: 40 } }, { id: 'rh', kind: 'nonsense' }],
    })
    expect(bad.status).toBe(400)
    expect(bad.body.issues.map((i) => i.path)).toEqual(expect.arrayContaining(['watches.0.params', 'watches.1.kind']))

    const saved = (await setWatches(ids['prep-deck']!, [{ ...rule, recipients: ['qa@inspector.example'] }])) as {
      source: string
      version: number
      watches: { id: string; openAfterMs: number; recipients: string[] }[]
    }
    expect(saved).toMatchObject({ source: 'booth', version: 1 })
    expect(saved.watches).toEqual([expect.objectContaining({ id: 'rh', openAfterMs: 120_000, recipients: ['qa@inspector.example'] })])
    const logged = await app.db.selectFrom('event_log').selectAll().where('type', '=', 'watches.updated').execute()
    expect(logged.map((e) => e.subject_id)).toContain(String(ids['prep-deck']))

    const reset = await manager.request<{ source: string }>('DELETE', `/api/watches/${ids['prep-deck']}`)
    expect(reset.body.source).toBe('defaults')
    const list = await manager.get<{ booths: { boothId: number; source: string }[]; catalogue: { kinds: unknown[] } }>('/api/watches')
    expect(list.body.booths.find((b) => b.boothId === ids['prep-deck'])?.source).toBe('defaults')
    expect(list.body.catalogue.kinds).toHaveLength(9)
  })
})

describe('threshold watch on the ingest path', () => {
  const T = Date.now() - 30 * MIN
  let firstId = 0

  it('does not open before the duration has passed', async () => {
    await setWatches(ids['downdraft-1']!, [{ id: 'rh', kind: 'rh_band', openAfterMs: 60_000, clearAfterMs: 20_000, hysteresis: 2 }])
    await setMode('downdraft-1', 'spray', T - S)
    await publish('downdraft-1', series(T, T + 55 * S, 5 * S, () => ({ rhPct: 75 })))
    await settle()
    expect(await alertsOf('downdraft-1', 'rh')).toEqual([])
  })

  it('opens once the value has been out of range for the duration, pushes it live and counts it', async () => {
    const controller = new AbortController()
    const res = await fetch(`${app.url}/api/alerts/stream`, { headers: { cookie: manager.cookie }, signal: controller.signal })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/text\/event-stream/)
    const reader = res.body!.getReader()

    await publish('downdraft-1', [{ t: T + 60 * S, extra: { rhPct: 76 } }])
    const [a] = await waitUntil(async () => {
      const list = await alertsOf('downdraft-1', 'rh')
      return list.length ? list : undefined
    })
    expect(a).toMatchObject({ kind: 'rh_band', state: 'open', value: 76, limit: 70, peak: 76, severity: 'warning', openedAt: new Date(T + 60 * S).toISOString() })
    expect(a!.message).toContain('76.0 %')
    firstId = a!.id

    let text = ''
    const deadline = Date.now() + 10_000
    while (!(text.includes('event: alert') && text.includes('event: summary') && text.includes(`"id":${firstId}`)) && Date.now() < deadline) {
      const { value, done } = await reader.read()
      if (done) break
      text += new TextDecoder().decode(value)
    }
    controller.abort()
    const alertEvent = text.split('\n\n').find((e) => e.includes('event: alert') && e.includes(`"id":${firstId}`))!
    expect(JSON.parse(alertEvent.split('\n').find((l) => l.startsWith('data: '))!.slice(6))).toMatchObject({ type: 'opened', alert: { id: firstId, ruleId: 'rh' } })

    const summary = await (await app.as('painter')).get<{ booths: { boothId: number; open: number; active: number }[] }>('/api/alerts/summary')
    expect(summary.status).toBe(200)
    expect(summary.body.booths.find((b) => b.boothId === ids['downdraft-1'])).toMatchObject({ open: 1, active: 1 })
    expect(summary.body.booths.find((b) => b.boothId === ids['downdraft-2'])).toMatchObject({ open: 0, active: 0 })
  })

  it('keeps one open alert per watch and booth', async () => {
    await publish('downdraft-1', series(T + 61 * S, T + 64 * S, S, () => ({ rhPct: 80 })))
    await settle()
    expect((await alertsOf('downdraft-1', 'rh')).filter((a) => a.state !== 'resolved')).toHaveLength(1)
    // The database refuses a second one outright (partial unique index).
    await expect(
      sql`INSERT INTO alerts (booth_id, rule_id, kind, severity, message, opened_at) VALUES (${ids['downdraft-1']}, 'rh', 'rh_band', 'warning', 'dup', now())`.execute(app.db),
    ).rejects.toThrow(/alerts_one_active_idx|duplicate key/)
  })

  it('stays open inside the hysteresis and clears after the clear delay', async () => {
    // 69 % is inside the 40–70 % band but not 2 % inside: still open.
    await publish('downdraft-1', series(T + 65 * S, T + 120 * S, 5 * S, () => ({ rhPct: 69 })))
    await settle()
    expect((await alertsOf('downdraft-1', 'rh'))[0]).toMatchObject({ id: firstId, state: 'open' })
    // 66 % for 15 s: recovered, but not for the 20 s clear delay yet.
    await publish('downdraft-1', series(T + 125 * S, T + 140 * S, 5 * S, () => ({ rhPct: 66 })))
    await settle()
    expect((await alertsOf('downdraft-1', 'rh'))[0]).toMatchObject({ id: firstId, state: 'open' })
    await publish('downdraft-1', [{ t: T + 145 * S, extra: { rhPct: 66 } }])
    const a = await waitUntil(async () => {
      const [x] = await alertsOf('downdraft-1', 'rh')
      return x?.state === 'resolved' ? x : undefined
    })
    expect(a).toMatchObject({
      id: firstId,
      resolution: 'cleared',
      clearedAt: new Date(T + 145 * S).toISOString(),
      peak: 80,
      durationMs: 85 * S,
    })
  })

  it('opens a new alert when the condition comes back', async () => {
    await publish('downdraft-1', series(T + 150 * S, T + 215 * S, 5 * S, () => ({ rhPct: 30 })))
    const list = await waitUntil(async () => {
      const l = await alertsOf('downdraft-1', 'rh')
      return l.length === 2 ? l : undefined
    })
    expect(list[0]).toMatchObject({ state: 'open', limit: 40, value: 30 })
    expect(list[0]!.id).not.toBe(firstId)
  })
})

describe('acknowledge and resolve', () => {
  const T = Date.now() - 20 * MIN
  let id = 0

  it('managers, admins and techs act on alerts; painters and auditors only read', async () => {
    await setWatches(ids['prep-deck']!, [{ id: 'airflow', kind: 'airflow_min_in_spray' }])
    await setMode('prep-deck', 'spray', T - S)
    await publish('prep-deck', series(T, T + 20 * S, 5 * S, () => ({ airflowMps: 0.1 })))
    const [a] = await waitUntil(async () => {
      const l = await alertsOf('prep-deck', 'airflow')
      return l.length ? l : undefined
    })
    expect(a).toMatchObject({ state: 'open', severity: 'critical', openedAt: new Date(T + 15 * S).toISOString() })
    id = a!.id

    const painter = await app.as('painter')
    const auditor = await app.as('auditor')
    expect((await painter.get(`/api/alerts/${id}`)).status).toBe(200)
    expect((await auditor.get(`/api/alerts?state=active`)).status).toBe(200)
    expect((await painter.post(`/api/alerts/${id}/acknowledge`, { note: 'seen' })).status).toBe(403)
    expect((await auditor.post(`/api/alerts/${id}/acknowledge`, { note: 'seen' })).status).toBe(403)
    expect((await painter.post(`/api/alerts/${id}/resolve`, { note: 'fixed' })).status).toBe(403)
    expect((await auditor.post(`/api/alerts/${id}/resolve`, { note: 'fixed' })).status).toBe(403)
    expect((await app.client().get('/api/alerts')).status).toBe(401)

    const tech = await app.as('tech')
    const ack = await tech.post<{ alert: AlertBody }>(`/api/alerts/${id}/acknowledge`, { note: 'Checking the exhaust fan' })
    expect(ack.status).toBe(200)
    expect(ack.body.alert).toMatchObject({ state: 'acknowledged', acknowledgedBy: { name: 'Tomas Reedley' }, acknowledgeNote: 'Checking the exhaust fan' })
    expect((await manager.post(`/api/alerts/${id}/acknowledge`, {})).status).toBe(409)

    const noNote = await manager.post<{ issues: { path: string }[] }>(`/api/alerts/${id}/resolve`, { note: '  ' })
    expect(noNote.status).toBe(400)
    expect(noNote.body.issues[0]?.path).toBe('note')
    const res = await manager.post<{ alert: AlertBody }>(`/api/alerts/${id}/resolve`, { note: 'Fan belt replaced' })
    expect(res.status).toBe(200)
    expect(res.body.alert).toMatchObject({ state: 'resolved', resolution: 'manual', resolvedBy: { name: 'Priya Fenwick' }, resolveNote: 'Fan belt replaced', clearedAt: null })
    expect((await manager.post(`/api/alerts/${id}/resolve`, { note: 'again' })).status).toBe(409)
    expect((await manager.post(`/api/alerts/999999/acknowledge`, {})).status).toBe(404)

    const events = await app.db.selectFrom('event_log').select(['type', 'actor_label']).where('subject_type', '=', 'alert').where('subject_id', '=', String(id)).orderBy('seq').execute()
    expect(events).toEqual([
      { type: 'alert.acknowledged', actor_label: 'Tomas Reedley (tech)' },
      { type: 'alert.resolved', actor_label: 'Priya Fenwick (manager)' },
    ])
  })

  it('a hand-resolved alert does not reopen while the condition lasts, and records when it cleared', async () => {
    await publish('prep-deck', series(T + 25 * S, T + 60 * S, 5 * S, () => ({ airflowMps: 0.1 })))
    await settle()
    expect(await alertsOf('prep-deck', 'airflow')).toHaveLength(1)
    await publish('prep-deck', series(T + 65 * S, T + 80 * S, 5 * S, () => ({ airflowMps: 0.5 })))
    const a = await waitUntil(async () => {
      const [x] = await alertsOf('prep-deck', 'airflow')
      return x?.clearedAt ? x : undefined
    })
    expect(a).toMatchObject({ id, state: 'resolved', resolution: 'manual', clearedAt: new Date(T + 80 * S).toISOString() })
  })

  it('lists with filters', async () => {
    const byState = await manager.get<{ alerts: AlertBody[] }>(`/api/alerts?state=resolved&boothId=${ids['prep-deck']}`)
    expect(byState.body.alerts.map((a) => a.id)).toEqual([id])
    const byKind = await manager.get<{ alerts: AlertBody[] }>(`/api/alerts?kind=rh_band`)
    expect(byKind.body.alerts.length).toBeGreaterThanOrEqual(2)
    expect(byKind.body.alerts.every((a) => a.kind === 'rh_band')).toBe(true)
    const future = await manager.get<{ alerts: AlertBody[] }>(`/api/alerts?from=${encodeURIComponent(new Date(Date.now() + MIN).toISOString())}`)
    expect(future.body.alerts).toEqual([])
    const page = await manager.get<{ alerts: AlertBody[]; nextBefore: number | null }>('/api/alerts?limit=1')
    expect(page.body.alerts).toHaveLength(1)
    expect(page.body.nextBefore).toBe(page.body.alerts[0]!.id)
    expect((await manager.get('/api/alerts?state=maybe')).status).toBe(400)
  })
})

describe('humidity drift (CUSUM)', () => {
  let rampEnd = 0
  it('opens on a slow humidity ramp well before the humidity band is crossed', async () => {
    const T = Math.floor((Date.now() - 60 * MIN) / MIN) * MIN
    rampEnd = T + 16 * MIN
    await setWatches(ids['downdraft-2']!, [
      { id: 'rh-band', kind: 'rh_band' },
      // Shop defaults (target 55 %, σ 1.5 %, k 0.5, h 5, 1-minute means) with fewer readings per mean, as this
      // test sends one every 5 s.
      { id: 'rh-drift', kind: 'rh_cusum', params: { minSubgroupCount: 10 } },
    ])
    await setMode('downdraft-2', 'spray', T - S)
    // +0.25 %RH per minute from the 55 % target, a little alternating noise; 16 minutes reach 59 %.
    const points = series(T, T + 16 * MIN, 5 * S, (t) => ({ rhPct: Math.round((55 + (0.25 * (t - T)) / MIN + (((t / (5 * S)) % 2) - 0.5) * 0.4) * 100) / 100 }))
    await publish('downdraft-2', points)
    const [drift] = await waitUntil(async () => {
      const l = await alertsOf('downdraft-2', 'rh-drift')
      return l.length ? l : undefined
    })
    expect(drift).toMatchObject({ kind: 'rh_cusum', state: 'open', limit: 55 })
    expect(drift!.value!).toBeLessThan(70)
    const opened = Date.parse(drift!.openedAt)
    expect(opened - T).toBeGreaterThan(5 * MIN)
    expect(opened - T).toBeLessThan(16 * MIN)
    expect(drift!.message).toMatch(/drifting up/)
    expect(Math.max(...points.map((p) => p.extra.rhPct as number))).toBeLessThan(60)
    expect(await alertsOf('downdraft-2', 'rh-band')).toEqual([])
  })

  it('stays open through a bake, and clears once spraying shows the humidity back at its target', async () => {
    const [drift] = await alertsOf('downdraft-2', 'rh-drift')
    expect(drift).toMatchObject({ state: 'open' })
    const end = rampEnd
    // Bake heating drives the booth RH to 10 %: says nothing about painting conditions, the alert holds.
    await setMode('downdraft-2', 'bake', end)
    await publish('downdraft-2', series(end + S, end + 5 * MIN, 5 * S, () => ({ rhPct: 10 })))
    await settle()
    expect((await alertsOf('downdraft-2', 'rh-drift'))[0]).toMatchObject({ id: drift!.id, state: 'open' })
    // Spraying again at 54 %: S_hi loses 54 − 55 − 0.75 = −1.75 %RH a minute, from at most 15 (capSigma 10 × σ 1.5).
    await setMode('downdraft-2', 'spray', end + 5 * MIN)
    await publish('downdraft-2', series(end + 5 * MIN + S, end + 15 * MIN, 5 * S, () => ({ rhPct: 54 })))
    const cleared = await waitUntil(async () => {
      const [x] = await alertsOf('downdraft-2', 'rh-drift')
      return x?.state === 'resolved' ? x : undefined
    })
    expect(cleared).toMatchObject({ id: drift!.id, resolution: 'cleared' })
    expect(Date.parse(cleared.clearedAt!)).toBeGreaterThan(end + 5 * MIN)
  })
})

describe('sensor silence and removed watches', () => {
  it('opens when a booth goes quiet, clears on the next reading, and ends when its watch is removed', async () => {
    await setWatches(ids['downdraft-2']!, [{ id: 'quiet', kind: 'sensor_silence', params: { silentAfterMs: 3_000 } }])
    await publish('downdraft-2', [{ t: Date.now() }])
    const [open] = await waitUntil(async () => {
      const l = await alertsOf('downdraft-2', 'quiet')
      return l.length ? l : undefined
    }, 15_000)
    expect(open).toMatchObject({ kind: 'sensor_silence', state: 'open', limit: 3 })
    expect(open!.value!).toBeGreaterThanOrEqual(3)
    await publish('downdraft-2', [{ t: Date.now() }])
    await waitUntil(async () => (await alertsOf('downdraft-2', 'quiet'))[0]?.state === 'resolved')
    expect((await alertsOf('downdraft-2', 'quiet'))[0]).toMatchObject({ resolution: 'cleared' })

    // Quiet again → a second alert; removing the watch ends it.
    const [again] = await waitUntil(async () => {
      const l = (await alertsOf('downdraft-2', 'quiet')).filter((a) => a.state === 'open')
      return l.length ? l : undefined
    }, 15_000)
    await setWatches(ids['downdraft-2']!, [{ id: 'rh-band', kind: 'rh_band' }])
    const ended = await waitUntil(async () => {
      const x = (await alertsOf('downdraft-2', 'quiet')).find((a) => a.id === again!.id)
      return x?.state === 'resolved' ? x : undefined
    })
    expect(ended.resolution).toBe('watch_removed')
  })
})

describe('restart', () => {
  it('keeps pending durations across a restart (evaluator snapshots)', async () => {
    const T = Date.now() - 10 * MIN
    // downdraft-1 still has the 60 s rh watch; the booth is back in range first.
    await publish('downdraft-1', series(T - 30 * S, T - 5 * S, 5 * S, () => ({ rhPct: 55 })))
    await waitUntil(async () => (await alertsOf('downdraft-1', 'rh')).every((a) => a.state === 'resolved'), 15_000)
    await publish('downdraft-1', series(T, T + 40 * S, 5 * S, () => ({ rhPct: 75 })))
    await settle()
    await devices['downdraft-1']?.endAsync()
    await app.stop()
    const saved = await app.db.selectFrom('watch_states').select('snapshot').where('booth_id', '=', ids['downdraft-1']!).executeTakeFirst()
    expect(JSON.stringify(saved?.snapshot)).toContain(String(T))
    await app.start()
    await alertsUp(app)
    manager = await app.as('manager')
    await publish('downdraft-1', series(T + 45 * S, T + 60 * S, 5 * S, () => ({ rhPct: 75 })))
    const open = await waitUntil(async () => (await alertsOf('downdraft-1', 'rh')).find((a) => a.state === 'open'))
    expect(open.openedAt).toBe(new Date(T + 60 * S).toISOString())
  })
})

describe('pages', () => {
  it('render on the server: alert list, alert detail, watches with the CUSUM explanation', async () => {
    const painter = await app.as('painter')
    const list = await painter.get<string>(`/alerts?booth=${ids['downdraft-1']}&state=all`)
    expect(list.status).toBe(200)
    expect(list.body).toContain('data-testid="alert-row"')
    expect(list.body).toContain('Downdraft booth 1 · Humidity out of range')
    const [a] = await alertsOf('downdraft-1', 'rh')
    const detail = await painter.get<string>(`/alerts/${a!.id}`)
    expect(detail.status).toBe(200)
    expect(detail.body).toContain('Timeline')
    expect(detail.body).toContain('Hold spraying until the booth is back in spec; follow the data sheet.')
    expect((await painter.get<string>('/alerts/987654')).status).toBe(404)
    const watches = await manager.get<string>(`/watches?booth=${ids['downdraft-2']}`)
    expect(watches.status).toBe(200)
    expect(watches.body).toContain('data-testid="watch"')
    expect((await manager.request('DELETE', `/api/watches/${ids['prep-deck']}`)).status).toBe(200)
    const withDrift = await manager.get<string>(`/watches?booth=${ids['prep-deck']}`)
    expect(withDrift.body).toContain('How the drift watch decides (k and h)')
    expect(withDrift.body).toContain('one false alarm in 465 one-minute averages')
  })

  it('the mailbox is not there in production unless MAILBOX_PAGE=1', async () => {
    const admin = await app.as('admin')
    expect((await admin.get('/api/mailbox')).status).toBe(404)
    expect((await admin.get('/api/mailbox/anything')).status).toBe(404)
    expect((await admin.get('/admin/mailbox')).status).toBe(404)
  })
})
