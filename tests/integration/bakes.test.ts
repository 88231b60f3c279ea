import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { MqttClient } from 'mqtt'
import { startTestApp, type TestApp } from '../support/app'
import { connectDevice, topicOf, waitUntil } from '../support/mqtt'
import { createBoothModel, type BoothStep } from '../../simulator/model'

// Bakes end to end: the controller's mode messages and the readings go through the embedded broker, the detector
// opens and ends the bake, a tech confirms and signs it off; roles are enforced; the screen's bake state.
let app: TestApp
const booth: Record<string, number> = {}
let clearcoatRevision: number

const MIN = 60_000

beforeAll(async () => {
  app = await startTestApp()
  for (const b of await app.db.selectFrom('booths').select(['id', 'slug']).execute()) booth[b.slug] = b.id
  // The demo seed's clearcoat: bake 30 min at 60 °C, or 15 min at 70 °C (invented values).
  clearcoatRevision = (
    await app.db
      .selectFrom('spec_revisions')
      .innerJoin('products', 'products.id', 'spec_revisions.product_id')
      .select('spec_revisions.id')
      .where('products.name', '=', '2K high-solids clearcoat')
      .executeTakeFirstOrThrow()
  ).id
})
afterAll(async () => {
  await app?.close()
})

/**
 * A job in the booth whose latest coat is of the clearcoat (written straight to the tables of the jobs area).
 * Demo jobs already in that booth are moved out first, so the bake is judged against this job alone.
 */
async function jobWithClearcoat(boothSlug: string, number: string, coatAtMs: number): Promise<number> {
  await app.db.updateTable('jobs').set({ booth_id: null, status: 'planned' }).where('booth_id', '=', booth[boothSlug]!).where('status', 'in', ['in_booth', 'curing']).execute()
  const job = await app.db
    .insertInto('jobs')
    .values({ number, vehicle: 'Invented hatchback, grey', booth_id: booth[boothSlug]!, status: 'in_booth', panels: ['bonnet'] })
    .returning('id')
    .executeTakeFirstOrThrow()
  const step = await app.db.insertInto('job_steps').values({ job_id: job.id, position: 1, revision_id: clearcoatRevision, coats_planned: 2 }).returning('id').executeTakeFirstOrThrow()
  await app.db
    .insertInto('coats')
    .values({ job_id: job.id, step_id: step.id, booth_id: booth[boothSlug]!, coat_number: 1, started_at: new Date(coatAtMs - 6 * MIN), finished_at: new Date(coatAtMs) })
    .execute()
  return job.id
}

async function publishAll(c: MqttClient, topic: string, payloads: string[]) {
  for (let i = 0; i < payloads.length; i += 50) await Promise.all(payloads.slice(i, i + 50).map((p) => c.publishAsync(topic, p, { qos: 1 })))
}

/** One simulated job cycle of downdraft-1 ending in idle, shifted so that the return to idle is `endMs`. */
function simulatedCycle(endMs: number) {
  const stepMs = 10_000
  const t0 = 0
  const m = createBoothModel({ booth: 'downdraft-1', seed: 5, startMs: t0, speed: 1, initialPhase: 'idle', dropouts: true })
  const steps: BoothStep[] = []
  let bakeAt: number | undefined
  for (let i = 1; i < 6 * 360; i++) {
    const s = m.next(t0 + i * stepMs)
    steps.push(s)
    if (bakeAt === undefined && s.mode === 'bake') bakeAt = s.tsMs
    if (bakeAt !== undefined && s.mode === 'idle') break
  }
  const shift = endMs - steps[steps.length - 1]!.tsMs
  const from = bakeAt! - 10 * MIN // ten minutes of flash before the bake
  const kept = steps.filter((s) => s.tsMs >= from)
  const readings = kept.filter((s) => s.reading).map((s) => JSON.stringify({ ...JSON.parse(s.payload!), ts: new Date(s.tsMs + shift).toISOString() }))
  const modes = kept.filter((s) => s.modeChanged).map((s) => ({ mode: s.modeChanged!, tsMs: s.tsMs + shift }))
  return { readings, modes, bakeStartMs: bakeAt! + shift, idleAtMs: endMs, coolAtMs: steps.find((s) => s.phase === 'cool')!.tsMs + shift }
}

describe('a bake opened by the controller through MQTT', () => {
  it('is detected, linked to the job, confirmed and signed off by the tech, with an event for each step', async () => {
    const endMs = Date.now() - 2 * MIN
    const cyc = simulatedCycle(endMs)
    const jobId = await jobWithClearcoat('downdraft-1', 'RO-24017', cyc.bakeStartMs - 15 * MIN)
    const c = await connectDevice(app.mqttUrl, 'downdraft-1')
    const bakeMode = cyc.modes.find((m) => m.mode === 'bake')!
    // Let the detector run a few empty rounds first: an empty round once left it stuck for good.
    await new Promise((r) => setTimeout(r, 3_000))
    await c.publishAsync(topicOf('downdraft-1', 'mode'), JSON.stringify({ ts: new Date(bakeMode.tsMs).toISOString(), mode: 'bake' }), { qos: 1 })
    // The detector opens a bake at the mode's time, in state 'detected'.
    const opened = await waitUntil(() => app.db.selectFrom('bakes').selectAll().where('booth_id', '=', booth['downdraft-1']!).executeTakeFirst())
    expect(opened.state).toBe('detected')
    expect(opened.source).toBe('mode')
    expect(opened.started_at.getTime()).toBe(bakeMode.tsMs)
    expect(opened.ended_at).toBeNull()

    await publishAll(c, topicOf('downdraft-1'), cyc.readings)
    for (const m of cyc.modes.filter((x) => x.tsMs > bakeMode.tsMs)) {
      await c.publishAsync(topicOf('downdraft-1', 'mode'), JSON.stringify({ ts: new Date(m.tsMs).toISOString(), mode: m.mode }), { qos: 1 })
    }
    await c.endAsync()
    // The cool mode keeps the bake open; idle ends it at the idle message's time.
    const ended = await waitUntil(async () => {
      const b = await app.db.selectFrom('bakes').selectAll().where('id', '=', opened.id).executeTakeFirstOrThrow()
      return b.ended_at ? b : undefined
    })
    expect(ended.ended_at!.getTime()).toBe(cyc.idleAtMs)
    expect(ended.end_source).toBe('mode')
    // Every reading is stored before the bake is judged.
    await waitUntil(async () => {
      const n = await app.db.selectFrom('readings').select((eb) => eb.fn.countAll<string>().as('n')).where('booth_id', '=', booth['downdraft-1']!).executeTakeFirstOrThrow()
      return Number(n.n) >= cyc.readings.length
    })

    const tech = await app.as('tech')
    const toConfirm = await tech.get<{ bakes: { id: number; state: string; jobs: { jobId: number }[] }[] }>('/api/bakes?state=to_confirm')
    expect(toConfirm.status).toBe(200)
    const listed = toConfirm.body.bakes.find((b) => b.id === opened.id)!
    expect(listed.state).toBe('detected')
    expect(listed.jobs.map((j) => j.jobId)).toEqual([jobId])

    // Signing off before confirming is refused.
    expect((await tech.post(`/api/bakes/${opened.id}/sign-off`, { notes: 'x' })).status).toBe(409)

    const confirmed = await tech.post<{ bake: { state: string; products: { productName: string; schedules: string[] }[] } }>(`/api/bakes/${opened.id}/confirm`, {})
    expect(confirmed.status).toBe(200)
    expect(confirmed.body.bake.state).toBe('confirmed')
    expect(confirmed.body.bake.products).toEqual([expect.objectContaining({ productName: '2K high-solids clearcoat', schedules: ['30 min at 60 °C', '15 min at 70 °C'] })])

    type Detail = {
      bake: { state: string }
      evaluation: {
        frozen: boolean
        targetC: number
        targetSource: string
        phases: { phases: { phase: string; startMs: number; endMs: number }[]; holdMinutes: number }
        judgement: { verdict: string; products: { verdict: string; schedules: { verdict: string; reason: string; equivalentMinutes: number }[] }[] }
      }
      safety: { cautions: { key: string }[] }
    }
    const detail = await tech.get<Detail>(`/api/bakes/${opened.id}`)
    expect(detail.status).toBe(200)
    const ev = detail.body.evaluation
    expect(ev.frozen).toBe(false)
    // The hold temperature comes from the spec (the lowest of the product's alternatives: 60 °C), not the tech.
    expect(ev.targetSource).toBe('spec')
    expect(ev.targetC).toBe(60)
    expect(ev.phases.phases[0]).toMatchObject({ phase: 'ramp', startMs: cyc.bakeStartMs })
    const j = ev.judgement
    expect(j.products).toHaveLength(1)
    // 30 min hold at 60 °C, plus the hot part of ramp and cool: "30 min at 60 °C" passes.
    const at60 = j.products[0]!.schedules[0]!
    expect(at60.verdict).toBe('pass')
    expect(at60.equivalentMinutes).toBeGreaterThan(30)
    expect(at60.reason).toMatch(/^held \d+(\.\d)? min at ≥ 60 °C; needs 30 min equivalent; cure credit \d+(\.\d)? min → pass$/)
    expect(j.verdict).toBe('pass')
    expect(detail.body.safety.cautions.map((x) => x.key)).toEqual(expect.arrayContaining(['no-spray-in-bake', 'interlocks', 'hot-surfaces', 'isocyanates']))

    const signed = await tech.post<Detail>(`/api/bakes/${opened.id}/sign-off`, { notes: 'Panels cooled, no runs; released to polish.' })
    expect(signed.status).toBe(200)
    expect(signed.body.bake.state).toBe('signed_off')
    expect(signed.body.evaluation.frozen).toBe(true)
    expect((await tech.post(`/api/bakes/${opened.id}/sign-off`, { notes: 'again' })).status).toBe(409)

    const events = await app.db.selectFrom('event_log').selectAll().where('subject_type', '=', 'bake').where('subject_id', '=', String(opened.id)).orderBy('seq').execute()
    expect(events.map((e) => e.type)).toEqual(['bake.detected', 'bake.ended', 'bake.confirmed', 'bake.signed_off'])
    expect(events[0]!.actor_id).toBeNull()
    const signedOff = events[3]!
    expect(signedOff.actor_label).toBe('Tomas Reedley (tech)')
    const payload = JSON.parse(signedOff.payload) as { verdict: string; notes: string; products: { schedules: { reason: string }[] }[] }
    expect(payload.verdict).toBe('pass')
    expect(payload.notes).toBe('Panels cooled, no runs; released to polish.')
    expect(payload.products[0]!.schedules[0]!.reason).toBe(at60.reason)
  })
})

describe('a bake started by hand, live', () => {
  it('gives the screen its phase and a "cure complete at" estimate, refuses a second bake, and ends by hand', async () => {
    const now = Date.now()
    await jobWithClearcoat('downdraft-2', 'RO-24018', now - 40 * MIN)
    const tech = await app.as('tech')
    const start = await tech.post<{ bake: { id: number; state: string; source: string } }>('/api/bakes', {
      boothId: booth['downdraft-2'],
      startedAt: new Date(now - 15 * MIN).toISOString(),
      notes: 'Bonnet and wing',
    })
    expect(start.status).toBe(201)
    expect(start.body.bake).toMatchObject({ state: 'confirmed', source: 'manual' })
    const id = start.body.bake.id
    expect((await tech.post('/api/bakes', { boothId: booth['downdraft-2'] })).status).toBe(409)

    // 15 minutes at 60 °C panel so far (one reading every 30 s).
    const c = await connectDevice(app.mqttUrl, 'downdraft-2')
    const payloads = []
    for (let t = now - 15 * MIN; t <= now; t += 30_000) payloads.push(JSON.stringify({ ts: new Date(t).toISOString(), airTempC: 62, rhPct: 12, panelTempC: 60, heaterOn: true }))
    await publishAll(c, topicOf('downdraft-2'), payloads)
    await c.endAsync()
    await waitUntil(async () => {
      const n = await app.db.selectFrom('readings').select((eb) => eb.fn.countAll<string>().as('n')).where('booth_id', '=', booth['downdraft-2']!).executeTakeFirstOrThrow()
      return Number(n.n) >= payloads.length
    })

    const painter = await app.as('painter')
    type Screen = { bake: { id: number; running: boolean; phaseNow: string; cureCompleteAt: string | null; verdict: string; products: { progress: number }[] } | null; cautions: unknown[] }
    const screen = await painter.get<Screen>(`/api/bakes/current?boothId=${booth['downdraft-2']}`)
    expect(screen.status).toBe(200)
    const b = screen.body.bake!
    expect(b).toMatchObject({ id, running: true, phaseNow: 'hold', verdict: 'pending' })
    // About half of "30 min at 60 °C" is done: the projected completion is about 15 min from now.
    const eta = Date.parse(b.cureCompleteAt!)
    expect(eta - now).toBeGreaterThan(12 * MIN)
    expect(eta - now).toBeLessThan(18 * MIN)
    expect(b.products[0]!.progress).toBeGreaterThan(0.45)
    expect(b.products[0]!.progress).toBeLessThan(0.6)
    expect(screen.body.cautions.length).toBeGreaterThan(0)

    const ended = await tech.post<{ bake: { running: boolean; endedBy: string } }>(`/api/bakes/${id}/end`, {})
    expect(ended.status).toBe(200)
    expect(ended.body.bake).toMatchObject({ running: false, endedBy: 'Tomas Reedley' })
    expect((await tech.post(`/api/bakes/${id}/end`, {})).status).toBe(409)
    // Ended after 15 min: "30 min at 60 °C" is not met, nor "15 min at 70 °C" at 60 °C → fail.
    const d = await tech.get<{ evaluation: { judgement: { verdict: string } } }>(`/api/bakes/${id}`)
    expect(d.body.evaluation.judgement.verdict).toBe('fail')
  })

  it('a detected bake can be dismissed with a reason and then counts for nothing', async () => {
    const id = (
      await app.db
        .insertInto('bakes')
        .values({ booth_id: booth['prep-deck']!, state: 'detected', source: 'heater', started_at: new Date(Date.now() - 5 * MIN) })
        .returning('id')
        .executeTakeFirstOrThrow()
    ).id
    const tech = await app.as('tech')
    expect((await tech.post(`/api/bakes/${id}/dismiss`, { reason: '' })).status).toBe(400)
    const r = await tech.post<{ bake: { state: string; running: boolean } }>(`/api/bakes/${id}/dismiss`, { reason: 'Heater test after service' })
    expect(r.status).toBe(200)
    expect(r.body.bake).toMatchObject({ state: 'dismissed', running: false })
    const counters = await tech.get<{ bakeCycles: number }>(`/api/booths/${booth['prep-deck']}/counters`)
    expect(counters.body.bakeCycles).toBe(0)
  })
})

describe('roles', () => {
  it('painter and auditor read bakes but may not record; signed out is 401', async () => {
    const { id } = await app.db.selectFrom('bakes').select('id').orderBy('id').limit(1).executeTakeFirstOrThrow()
    for (const who of ['painter', 'auditor']) {
      const c = await app.as(who)
      expect((await c.get('/api/bakes')).status).toBe(200)
      expect((await c.get(`/api/bakes/${id}`)).status).toBe(200)
      expect((await c.get(`/api/bakes/current?boothId=${booth['downdraft-1']}`)).status).toBe(200)
      expect((await c.post('/api/bakes', { boothId: booth['prep-deck'] })).status).toBe(403)
      for (const action of ['confirm', 'end', 'sign-off']) expect((await c.post(`/api/bakes/${id}/${action}`, { notes: 'n' })).status).toBe(403)
      expect((await c.post(`/api/bakes/${id}/dismiss`, { reason: 'not mine' })).status).toBe(403)
    }
    const anon = app.client()
    expect((await anon.get('/api/bakes')).status).toBe(401)
    expect((await anon.post('/api/bakes', { boothId: booth['prep-deck'] })).status).toBe(401)
    // No bake was started by the refused requests.
    const prep = await app.db.selectFrom('bakes').select('id').where('booth_id', '=', booth['prep-deck']!).where('state', '!=', 'dismissed').execute()
    expect(prep).toEqual([])
  })
})
