import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startTestApp, type TestApp } from '../support/app'
import type { ApiClient } from '../support/http'

// Booth screens: pairing codes (short expiry here), a session limited to one booth, painters acting
// with their PIN, PIN attempts limited per painter.
let app: TestApp
let booth1: number
let booth2: number
let painterId: number
let techId: number
const ALPHABET = 'ACEFHJKMNPRTUVWXY3479'

async function pairedScreen(boothId: number): Promise<ApiClient> {
  const manager = await app.as('manager')
  const issued = await manager.post<{ code: string }>(`/api/booths/${boothId}/pairing-codes`)
  expect(issued.status).toBe(201)
  const screen = app.client()
  const r = await screen.post('/api/screen/pair', { code: issued.body.code })
  expect(r.status, JSON.stringify(r.body)).toBe(200)
  return screen
}

beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off', PAIRING_CODE_TTL_SECONDS: '3' }, { waitFor: 'http' })
  const booths = await app.db.selectFrom('booths').select(['id', 'slug']).execute()
  booth1 = booths.find((b) => b.slug === 'downdraft-1')!.id
  booth2 = booths.find((b) => b.slug === 'downdraft-2')!.id
  painterId = (await app.db.selectFrom('users').select('id').where('email', '=', 'painter@larkspur.example').executeTakeFirstOrThrow()).id
  techId = (await app.db.selectFrom('users').select('id').where('email', '=', 'tech@larkspur.example').executeTakeFirstOrThrow()).id
  // Current readings (20 °C, 50 %) so the guard rails have something to check.
  const { ensurePartitions } = await import('../../server/telemetry/partitions')
  const { insertReadingBatch } = await import('../../server/telemetry/insert-batch')
  const now = Date.now()
  await ensurePartitions(app.pool, now - 86_400_000, now + 86_400_000)
  const rows = []
  for (let t = now - 10 * 60_000; t <= now + 30 * 60_000; t += 10_000) {
    rows.push({ boothId: booth1, tsMs: t, receivedMs: t, deviceId: 'larkspur-downdraft-1', seq: null, airTempC: 20, rhPct: 50, panelTempC: 20, airflowMps: 0.3, boothDpPa: 6, intakeFilterDpPa: null, exhaustFilterDpPa: null, heaterOn: false, dewPointC: 9.26 })
  }
  await insertReadingBatch(app.pool, rows)
}, 180_000)
afterAll(async () => {
  await app?.close()
})

describe('pairing codes', () => {
  it('are issued by managers only, 6 characters of the unambiguous alphabet, stored hashed', async () => {
    expect((await app.client().post(`/api/booths/${booth1}/pairing-codes`)).status).toBe(401)
    expect((await (await app.as('painter')).post(`/api/booths/${booth1}/pairing-codes`)).status).toBe(403)
    expect((await (await app.as('tech')).post(`/api/booths/${booth1}/pairing-codes`)).status).toBe(403)
    const manager = await app.as('manager')
    expect((await manager.post('/api/booths/999999/pairing-codes')).status).toBe(404)
    const r = await manager.post<{ code: string; expiresAt: string; boothId: number }>(`/api/booths/${booth1}/pairing-codes`)
    expect(r.status).toBe(201)
    expect(r.body.code).toMatch(new RegExp(`^[${ALPHABET}]{6}$`))
    expect(r.body.boothId).toBe(booth1)
    const rows = await app.db.selectFrom('pairing_codes').select(['code_hash']).execute()
    expect(rows.length).toBeGreaterThan(0)
    expect(rows.every((x) => /^[0-9a-f]{64}$/.test(x.code_hash) && !x.code_hash.includes(r.body.code))).toBe(true)
    const ttl = Date.parse(r.body.expiresAt) - Date.now()
    expect(ttl).toBeGreaterThan(0)
    expect(ttl).toBeLessThanOrEqual(3_500)
  })

  it('pair a screen once; a used, wrong or expired code is refused', async () => {
    const manager = await app.as('manager')
    const { code } = (await manager.post<{ code: string }>(`/api/booths/${booth1}/pairing-codes`)).body
    const screen = app.client()
    expect((await screen.get('/api/screen/me')).status).toBe(401)
    // Typed in lower case with a space: still the code.
    const paired = await screen.post<{ screen: { boothId: number } }>('/api/screen/pair', { code: `${code.slice(0, 3).toLowerCase()} ${code.slice(3)}` })
    expect(paired.status).toBe(200)
    expect(paired.body.screen.boothId).toBe(booth1)
    expect((await screen.get<{ screen: { boothId: number } }>('/api/screen/me')).body.screen.boothId).toBe(booth1)
    expect((await app.client().post('/api/screen/pair', { code })).status).toBe(400)
    expect((await app.client().post('/api/screen/pair', { code: 'AAAAAA' })).status).toBe(400)
    const late = (await manager.post<{ code: string }>(`/api/booths/${booth1}/pairing-codes`)).body.code
    await new Promise((r) => setTimeout(r, 3_300))
    const expired = await app.client().post<{ message: string }>('/api/screen/pair', { code: late })
    expect(expired.status).toBe(400)
    expect(expired.body.message).toMatch(/expired/)
  })
})

describe('a paired screen', () => {
  it('sees its own booth only and reaches no staff route', async () => {
    const screen = await pairedScreen(booth1)
    const own = await screen.get<{ boothId: number; job: { number: string } | null; people: { id: number; name: string }[] }>(`/api/booths/${booth1}/screen`)
    expect(own.status).toBe(200)
    expect(own.body.job?.number).toBe('RO-24117')
    // The demo painter has a PIN; the screen lists them first (assigned to the job).
    expect(own.body.people[0]!.id).toBe(painterId)
    expect((await screen.get(`/api/booths/${booth2}/screen`)).status).toBe(403)
    expect((await screen.get(`/api/booths/${booth2}/live`)).status).toBe(403)
    // No user in a screen session: every staff route refuses it.
    for (const path of ['/api/users', '/api/booths', '/api/jobs', `/api/jobs/1`, '/api/me']) {
      const r = await screen.get(path)
      expect(r.status, path).toBe(403)
    }
    expect((await screen.post(`/api/booths/${booth1}/pairing-codes`)).status).toBe(403)
    expect((await screen.post('/api/jobs', { number: 'RO-1', vehicle: 'x' })).status).toBe(403)
    expect((await screen.post('/api/me/pin', { pin: '1234' })).status).toBe(403)
  })

  it('lets a painter act with their PIN, on its own booth only', async () => {
    const painter = await app.as('painter')
    expect((await painter.post('/api/me/pin', { pin: '12' })).status).toBe(400)
    expect((await painter.post('/api/me/pin', { pin: '97531' })).status).toBe(200)
    expect((await app.client().post('/api/me/pin', { pin: '97531' })).status).toBe(401)
    expect((await (await app.as('auditor')).post('/api/me/pin', { pin: '97531' })).status).toBe(403)
    const pinRow = await app.db.selectFrom('users').select('pin_hash').where('id', '=', painterId).executeTakeFirstOrThrow()
    expect(pinRow.pin_hash).not.toContain('97531')

    const screen = await pairedScreen(booth1)
    expect((await screen.post<{ painter: { id: number } }>('/api/screen/pin-check', { painterId, pin: '97531' })).body.painter.id).toBe(painterId)
    const state = (await screen.get<{ job: { id: number }; nextCoat: { stepId: number; coatNumber: number } }>(`/api/booths/${booth1}/screen`)).body
    const start = { jobId: state.job.id, stepId: state.nextCoat.stepId, coatNumber: state.nextCoat.coatNumber }
    const noPin = await screen.post<{ message: string }>('/api/coats', start)
    expect(noPin.status).toBe(400)
    expect(noPin.body.message).toMatch(/PIN/)
    expect((await screen.post('/api/coats', { ...start, painterId, pin: '11111' })).status).toBe(403)
    const ok = await screen.post<{ coat: { id: number }; painter: { id: number } }>('/api/coats', { ...start, painterId, pin: '97531' })
    expect(ok.status, JSON.stringify(ok.body)).toBe(201)
    expect(ok.body.painter.id).toBe(painterId)
    const coat = await app.db.selectFrom('coats').selectAll().where('id', '=', ok.body.coat.id).executeTakeFirstOrThrow()
    expect(coat.painter_id).toBe(painterId)
    const ev = await app.db.selectFrom('event_log').select(['actor_id', 'actor_label', 'payload']).where('type', '=', 'coat.started').orderBy('seq', 'desc').executeTakeFirstOrThrow()
    expect(ev.actor_id).toBe(painterId)
    expect(JSON.parse(ev.payload)).toMatchObject({ via: 'screen' })
    expect((await screen.post(`/api/coats/${ok.body.coat.id}/finish`, { painterId, pin: '97531' })).status).toBe(200)

    // The screen of booth 2 cannot act on booth 1's coat or log a mix for booth 1.
    const other = await pairedScreen(booth2)
    const nextState = (await screen.get<{ job: { id: number }; nextCoat: { stepId: number; coatNumber: number } }>(`/api/booths/${booth1}/screen`)).body
    expect((await other.post('/api/coats', { jobId: nextState.job.id, stepId: nextState.nextCoat.stepId, coatNumber: nextState.nextCoat.coatNumber, painterId, pin: '97531', reason: 'test' })).status).toBe(403)
    expect((await other.post('/api/mixes', { boothId: booth1, revisionId: 1, painterId, pin: '97531' })).status).toBe(403)
  })

  it('pushes its state as Server-Sent Events', async () => {
    const screen = await pairedScreen(booth1)
    const ctrl = new AbortController()
    const res = await fetch(`${app.url}/api/booths/${booth1}/screen/stream`, { headers: { cookie: screen.cookie }, signal: ctrl.signal })
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/text\/event-stream/)
    const reader = res.body!.getReader()
    let text = ''
    const until = Date.now() + 10_000
    while (!text.includes('event: screen') || !text.includes('\n\n')) {
      const { value, done } = await reader.read()
      if (done || Date.now() > until) break
      text += new TextDecoder().decode(value)
    }
    ctrl.abort()
    expect(text).toContain('event: screen')
    const data = JSON.parse(text.split('\n').find((l) => l.startsWith('data: '))!.slice(6)) as { boothId: number; job: { number: string } }
    expect(data).toMatchObject({ boothId: booth1, job: { number: 'RO-24117' } })
    const refused = await fetch(`${app.url}/api/booths/${booth2}/screen/stream`, { headers: { cookie: screen.cookie } })
    expect(refused.status).toBe(403)
    await refused.body?.cancel()
  })

  it('limits PIN attempts per painter with 429, even for the right PIN', async () => {
    const tech = await app.as('tech')
    expect((await tech.post('/api/me/pin', { pin: '2580' })).status).toBe(200)
    const screen = await pairedScreen(booth1)
    const statuses: number[] = []
    let retryAfter: string | null = null
    for (let i = 0; i < 7; i++) {
      const r = await screen.post('/api/screen/pin-check', { painterId: techId, pin: `000${i}` })
      statuses.push(r.status)
      if (r.status === 429) retryAfter = r.headers.get('retry-after')
    }
    expect(statuses.slice(0, 4)).toEqual([403, 403, 403, 403])
    expect(statuses.at(-1)).toBe(429)
    expect(Number(retryAfter)).toBeGreaterThan(0)
    expect((await screen.post('/api/screen/pin-check', { painterId: techId, pin: '2580' })).status).toBe(429)
    const state = (await screen.get<{ job: { id: number }; nextCoat: { stepId: number; coatNumber: number } }>(`/api/booths/${booth1}/screen`)).body
    expect((await screen.post('/api/coats', { jobId: state.job.id, stepId: state.nextCoat.stepId, coatNumber: state.nextCoat.coatNumber, painterId: techId, pin: '2580', reason: 'Checked by hand' })).status).toBe(429)
    // Another painter is not locked out by it.
    expect((await screen.post('/api/screen/pin-check', { painterId, pin: '97531' })).status).toBe(200)
  })
})
