import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startTestApp, type TestApp } from '../support/app'
import type { ApiClient } from '../support/http'

// Jobs, coats and mixes through the API, on stored readings put straight into the database (no
// broker): the countdowns come from those rows, so they must be the same after a restart.
let app: TestApp
let booth1: number
let booth2: number
let jobId: number
const MIN = 60_000
const now0 = Date.now()
// The story starts an hour ago; times are sent as `at` (a coat entered afterwards).
const T0 = now0 - 60 * MIN
const iso = (ms: number) => new Date(ms).toISOString()

interface Detail {
  job: { id: number; number: string; status: string; booth: { id: number } | null }
  steps: { id: number; position: number; revisionId: number; coatsPlanned: number; coatsDone: number; revision: { productName: string; chemistry: string } }[]
  coats: { id: number; stepId: number; coatNumber: number; overrides: { kind: string; reason: string }[]; flash: { waitedMinutes: number; requiredMinutes: number | null; ready: boolean } | null; finishedAt: string | null }[]
}
interface Screen {
  job: { number: string } | null
  flash: { stage: string; ready: boolean; recoatWindowPassed: boolean; readyAt: string | null; readyBy: string | null; recoatWindowEndsAt: string | null; progress: number | null; uncertain: boolean } | null
  nextCoat: { stepId: number; coatNumber: number; position: number; product: string } | null
  coatInProgress: { id: number } | null
  mixes: { id: number; potLife: { expiresAt: string | null; usedFraction: number | null } | null; warnings: string[] }[]
  checks: { needsReason: string[] }
}

async function insertReadings(boothId: number, fromMs: number, toMs: number, stepMs: number, values: { airTempC: number; rhPct: number; panelTempC: number; airflowMps: number }) {
  const { ensurePartitions } = await import('../../server/telemetry/partitions')
  const { insertReadingBatch } = await import('../../server/telemetry/insert-batch')
  await ensurePartitions(app.pool, fromMs - 86_400_000, toMs + 86_400_000)
  const rows = []
  for (let t = fromMs; t <= toMs; t += stepMs) {
    rows.push({ boothId, tsMs: t, receivedMs: t, deviceId: 'larkspur-downdraft-1', seq: null, ...values, boothDpPa: 6, intakeFilterDpPa: null, exhaustFilterDpPa: null, heaterOn: false, dewPointC: 9.26 })
  }
  await insertReadingBatch(app.pool, rows)
}

const startBody = (d: Detail, extra: Record<string, unknown> = {}) => {
  const step = d.steps.find((s) => s.coatsDone < s.coatsPlanned)!
  return { jobId: d.job.id, stepId: step.id, coatNumber: step.coatsDone + 1, ...extra }
}

beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  const booths = await app.db.selectFrom('booths').select(['id', 'slug']).execute()
  booth1 = booths.find((b) => b.slug === 'downdraft-1')!.id
  booth2 = booths.find((b) => b.slug === 'downdraft-2')!.id
  jobId = (await app.db.selectFrom('jobs').select('id').where('number', '=', 'RO-24117').executeTakeFirstOrThrow()).id
  // 20 °C, 50 % RH, 0.3 m/s: the reference conditions of the demo products (rate 1), readings every
  // 10 s from before the story to 20 minutes ahead (so "now" always has a current reading).
  await insertReadings(booth1, T0 - 5 * MIN, now0 + 20 * MIN, 10_000, { airTempC: 20, rhPct: 50, panelTempC: 20, airflowMps: 0.3 })
}, 180_000)
afterAll(async () => {
  await app?.close()
})

describe('jobs', () => {
  it('seeds the demo repair orders with the finish plan primer → wet bed → basecoat ×2 → clearcoat ×2', async () => {
    const c = await app.as('auditor')
    const list = await c.get<{ jobs: { number: string; status: string }[] }>('/api/jobs')
    expect(list.status).toBe(200)
    expect(list.body.jobs.map((j) => j.number).sort()).toEqual(['RO-24117', 'RO-24123'])
    const d = await c.get<Detail>(`/api/jobs/${jobId}`)
    expect(d.body.job.booth?.id).toBe(booth1)
    expect(d.body.steps.map((s) => [s.revision.productName, s.coatsPlanned])).toEqual([
      ['2K high-build primer surfacer', 2],
      ['Clear binder wet bed', 1],
      ['Waterborne basecoat, silver metallic', 2],
      ['2K high-solids clearcoat', 2],
    ])
  })

  it('lets managers and techs create and edit jobs, refuses painters and auditors, and filters by status', async () => {
    const manager = await app.as('manager')
    const options = await manager.get<{ revisions: { id: number; productName: string }[]; painters: { id: number }[] }>('/api/jobs/plan-options')
    const clear = options.body.revisions.find((r) => r.productName === '2K high-solids clearcoat')!
    const body = { number: 'RO-90001', vehicle: 'Small van, sliding door', colourCode: 'WHT-02', panels: ['right sliding door'], steps: [{ revisionId: clear.id, coatsPlanned: 2 }] }
    expect((await app.client().post('/api/jobs', body)).status).toBe(401)
    expect((await (await app.as('painter')).post('/api/jobs', body)).status).toBe(403)
    expect((await (await app.as('auditor')).post('/api/jobs', body)).status).toBe(403)
    const created = await manager.post<Detail>('/api/jobs', body)
    expect(created.status).toBe(201)
    expect(created.body.steps).toHaveLength(1)
    expect((await manager.post('/api/jobs', body)).status).toBe(409)
    const bad = await manager.post<{ issues: { path: string }[] }>('/api/jobs', { ...body, number: 'RO-90002', steps: [{ revisionId: 999999, coatsPlanned: 2 }] })
    expect(bad.status).toBe(400)
    expect(bad.body.issues[0]!.path).toBe('steps.0.revisionId')
    const tech = await app.as('tech')
    const patched = await tech.patch<Detail>(`/api/jobs/${created.body.job.id}`, { boothId: booth2, status: 'in_booth' })
    expect(patched.status).toBe(200)
    expect(patched.body.job).toMatchObject({ status: 'in_booth', booth: { id: booth2 } })
    const plan = await tech.request<Detail>('PUT', `/api/jobs/${created.body.job.id}/steps`, { steps: [{ id: created.body.steps[0]!.id, revisionId: clear.id, coatsPlanned: 3 }] })
    expect(plan.status).toBe(200)
    expect(plan.body.steps[0]!.coatsPlanned).toBe(3)
    const inBooth = await manager.get<{ jobs: { number: string }[] }>('/api/jobs?status=in_booth')
    expect(inBooth.body.jobs.map((j) => j.number)).toEqual(['RO-90001'])
    expect((await manager.get('/api/jobs?status=nonsense')).status).toBe(400)
  })
})

describe('coats', () => {
  it('answers 401 to anonymous and 403 to an auditor trying to start a coat', async () => {
    const d = (await (await app.as('manager')).get<Detail>(`/api/jobs/${jobId}`)).body
    expect((await app.client().post('/api/coats', startBody(d))).status).toBe(401)
    const auditor = await app.as('auditor')
    const r = await auditor.post('/api/coats', startBody(d))
    expect(r.status).toBe(403)
    expect((await auditor.post('/api/coats/1/finish', {})).status).toBe(403)
  })

  it('starts and finishes coats; an early start needs a reason (400), which is then recorded', async () => {
    const painter = await app.as('painter')
    let d = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
    const first = await painter.post<{ coat: { id: number } }>('/api/coats', startBody(d, { at: iso(T0) }))
    expect(first.status, JSON.stringify(first.body)).toBe(201)
    // A second coat cannot start while one is being sprayed in the booth.
    d = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
    expect((await painter.post('/api/coats', startBody(d, { at: iso(T0 + MIN) }))).status).toBe(409)
    expect((await painter.post(`/api/coats/${first.body.coat.id}/finish`, { at: iso(T0 + 3 * MIN) })).status).toBe(200)

    // Primer: 5 min flash at 20 °C. Two minutes after the coat is too early.
    d = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
    const early = await painter.post<{ message: string; issues: { path: string; message: string }[] }>('/api/coats', startBody(d, { at: iso(T0 + 5 * MIN) }))
    expect(early.status).toBe(400)
    expect(early.body.message).toMatch(/not finished the flash-off between coats/)
    expect(early.body.message).toMatch(/reason/i)
    expect(early.body.issues).toEqual([expect.objectContaining({ path: 'reason' })])
    // The screen shows coat 2 of step 1 as next; a stale screen asking for another coat gets 409.
    expect((await painter.post('/api/coats', { ...startBody(d, { at: iso(T0 + 5 * MIN) }), coatNumber: 1 })).status).toBe(409)

    const withReason = await painter.post<{ coat: { id: number; overrides: { kind: string; reason: string }[] } }>(
      '/api/coats',
      startBody(d, { at: iso(T0 + 5 * MIN), reason: 'Tack-free by touch test on the masking' }),
    )
    expect(withReason.status, JSON.stringify(withReason.body)).toBe(201)
    const row = await app.db.selectFrom('coats').selectAll().where('id', '=', withReason.body.coat.id).executeTakeFirstOrThrow()
    expect(row.overrides).toEqual([expect.objectContaining({ kind: 'flash_not_complete', reason: 'Tack-free by touch test on the masking' })])
    expect(row.start_check.flash).toMatchObject({ kind: 'between_coats', waitedMinutes: 2, ready: false })
    expect(row.start_check.flash!.requiredMinutes).toBeCloseTo(5, 1)
    expect((await painter.post(`/api/coats/${withReason.body.coat.id}/finish`, { at: iso(T0 + 9 * MIN) })).status).toBe(200)

    // The events were written, and the revision is frozen.
    const events = await app.db.selectFrom('event_log').select(['type', 'payload']).where('subject_type', '=', 'job').where('subject_id', '=', String(jobId)).orderBy('seq').execute()
    expect(events.map((e) => e.type)).toEqual(['job.created', 'coat.started', 'coat.finished', 'coat.started', 'coat.finished'])
    expect(JSON.parse(events[3]!.payload)).toMatchObject({ overrides: [expect.objectContaining({ kind: 'flash_not_complete' })] })
    const step1 = d.steps[0]!
    const rev = await app.db.selectFrom('spec_revisions').select('frozen_at').where('id', '=', step1.revisionId).executeTakeFirstOrThrow()
    expect(rev.frozen_at).not.toBeNull()
    const job = await painter.get<Detail>(`/api/jobs/${jobId}`)
    expect(job.body.job.status).toBe('in_booth')
    expect(job.body.coats.map((c) => [c.coatNumber, c.overrides.length])).toEqual([
      [1, 0],
      [2, 1],
    ])
  })

  it('recomputes the countdown from stored readings: the same after a restart', async () => {
    const painter = await app.as('painter')
    const s1 = await painter.get<Screen>(`/api/booths/${booth1}/screen`)
    expect(s1.status).toBe(200)
    expect(s1.body.job?.number).toBe('RO-24117')
    expect(s1.body.nextCoat).toMatchObject({ position: 2, coatNumber: 1, product: 'Clear binder wet bed' })
    // Primer's flash before the next product is 15 min at 20 °C; its last coat finished at T0 + 9 min.
    expect(s1.body.flash).toMatchObject({ stage: 'before-next', ready: true })
    expect(Math.abs(Date.parse(s1.body.flash!.readyAt!) - (T0 + 24 * MIN))).toBeLessThanOrEqual(5)
    await app.stop()
    await app.start()
    const s2 = (await painter.get<Screen>(`/api/booths/${booth1}/screen`)).body
    expect(s2.flash!.readyAt).toBe(s1.body.flash!.readyAt)
    expect(s2.flash!.readyBy).toBe(s1.body.flash!.readyBy)

    // A countdown still running: the wet bed, sprayed now (1 min flash, 10 min recoat window).
    const d = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
    const started = await painter.post<{ coat: { id: number } }>('/api/coats', startBody(d))
    expect(started.status, JSON.stringify(started.body)).toBe(201)
    expect((await painter.post(`/api/coats/${started.body.coat.id}/finish`, {})).status).toBe(200)
    const running = (await painter.get<Screen>(`/api/booths/${booth1}/screen`)).body
    expect(running.flash).toMatchObject({ stage: 'before-next', recoatWindowPassed: false })
    const finishedAt = Date.parse((await app.db.selectFrom('coats').select('finished_at').where('id', '=', started.body.coat.id).executeTakeFirstOrThrow()).finished_at!.toISOString())
    expect(Math.abs(Date.parse(running.flash!.recoatWindowEndsAt!) - (finishedAt + 10 * MIN))).toBeLessThanOrEqual(1000)
    const before = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
    await app.stop()
    await app.start()
    const after = (await painter.get<Screen>(`/api/booths/${booth1}/screen`)).body
    expect(Math.abs(Date.parse(after.flash!.readyAt!) - Date.parse(running.flash!.readyAt!))).toBeLessThanOrEqual(1000)
    expect(Math.abs(Date.parse(after.flash!.recoatWindowEndsAt!) - Date.parse(running.flash!.recoatWindowEndsAt!))).toBeLessThanOrEqual(1000)
    expect((await painter.get<Detail>(`/api/jobs/${jobId}`)).body.coats).toEqual(before.coats)
  })
})

describe('mixes', () => {
  it('logs a mix with reducer advice and a mismatch warning, shows its pot life, and closes it', async () => {
    const painter = await app.as('painter')
    const d = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
    const clearStep = d.steps.find((s) => s.revision.productName === '2K high-solids clearcoat')!
    const body = { boothId: booth1, jobId, stepId: clearStep.id, revisionId: clearStep.revisionId, reducerGrade: 'Slow', amountMl: 500 }
    expect((await app.client().post('/api/mixes', body)).status).toBe(401)
    expect((await (await app.as('auditor')).post('/api/mixes', body)).status).toBe(403)
    const r = await painter.post<{ mix: { id: number; reducerAdvised: string; warnings: string[] } }>('/api/mixes', body)
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    // 20 °C is in the clearcoat's "Standard" band (18–27 °C).
    expect(r.body.mix.reducerAdvised).toBe('Standard')
    const row = await app.db.selectFrom('mixes').selectAll().where('id', '=', r.body.mix.id).executeTakeFirstOrThrow()
    expect(row.warnings).toEqual([expect.stringMatching(/Slow logged; the data sheet advises Standard/)])
    const s = (await painter.get<Screen>(`/api/booths/${booth1}/screen`)).body
    const m = s.mixes.find((x) => x.id === r.body.mix.id)!
    // Pot life 120 min at 20 °C.
    expect(Math.abs(Date.parse(m.potLife!.expiresAt!) - (Date.parse(row.mixed_at.toISOString()) + 120 * MIN))).toBeLessThan(2000)
    expect((await (await app.as('auditor')).post(`/api/mixes/${r.body.mix.id}/close`, { outcome: 'used' })).status).toBe(403)
    expect((await painter.post(`/api/mixes/${r.body.mix.id}/close`, { outcome: 'thrown' })).status).toBe(400)
    const closed = await painter.post<{ mix: { outcome: string } }>(`/api/mixes/${r.body.mix.id}/close`, { outcome: 'discarded' })
    expect(closed.body.mix.outcome).toBe('discarded')
    expect((await painter.post(`/api/mixes/${r.body.mix.id}/close`, { outcome: 'used' })).status).toBe(409)
    const after = (await painter.get<Screen>(`/api/booths/${booth1}/screen`)).body
    expect(after.mixes.some((x) => x.id === r.body.mix.id)).toBe(false)
  })

  it('refuses a mix for a job in another booth', async () => {
    const painter: ApiClient = await app.as('painter')
    const d = (await painter.get<Detail>(`/api/jobs/${jobId}`)).body
    const r = await painter.post('/api/mixes', { boothId: booth2, jobId, revisionId: d.steps[0]!.revisionId })
    expect(r.status).toBe(400)
  })
})
