import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startTestApp, type TestApp } from '../support/app'

// The bake and maintenance pages render on the server for each role, with the recording forms only for
// those who may record.
let app: TestApp
let bakeId: number
let boothId: number

beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  boothId = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-1').executeTakeFirstOrThrow()).id
  bakeId = (
    await app.db
      .insertInto('bakes')
      .values({ booth_id: boothId, state: 'detected', source: 'mode', started_at: new Date(Date.now() - 30 * 60_000), ended_at: new Date(Date.now() - 5 * 60_000), end_source: 'mode' })
      .returning('id')
      .executeTakeFirstOrThrow()
  ).id
})
afterAll(async () => {
  await app?.close()
})

describe('bake and maintenance pages', () => {
  it('a tech sees the bakes to confirm, the start form, the bake with its actions and safety notes', async () => {
    const tech = await app.as('tech')
    const list = await tech.request<string>('GET', '/bakes', undefined, { accept: 'text/html' })
    expect(list.status).toBe(200)
    expect(list.body).toContain('data-testid="bakes-to-confirm"')
    expect(list.body).toContain('Start a bake')
    const detail = await tech.request<string>('GET', `/bakes/${bakeId}`, undefined, { accept: 'text/html' })
    expect(detail.status).toBe(200)
    expect(detail.body).toContain(`Bake ${bakeId}`)
    expect(detail.body).toContain('Confirm bake')
    expect(detail.body).toContain('No spraying while the booth bakes')
    expect(detail.body).toContain('data sheet')
    const mt = await tech.request<string>('GET', `/maintenance?booth=${boothId}`, undefined, { accept: 'text/html' })
    expect(mt.status).toBe(200)
    expect(mt.body).toContain('data-testid="filter-change-form"')
    expect(mt.body).toContain('data-testid="reminders"')
    const hist = await tech.request<string>('GET', `/maintenance/booths/${boothId}`, undefined, { accept: 'text/html' })
    expect(hist.status).toBe(200)
    expect(hist.body).toContain('data-testid="booth-counters"')
    expect(hist.body).toContain(`Bake ${bakeId}`)
  })

  it('a painter and an auditor read the pages without any recording form', async () => {
    for (const who of ['painter', 'auditor']) {
      const c = await app.as(who)
      const list = await c.request<string>('GET', '/bakes', undefined, { accept: 'text/html' })
      expect(list.status).toBe(200)
      expect(list.body).not.toContain('Start a bake')
      const detail = await c.request<string>('GET', `/bakes/${bakeId}`, undefined, { accept: 'text/html' })
      expect(detail.body).toContain(`Bake ${bakeId}`)
      expect(detail.body).not.toContain('Confirm bake')
      const mt = await c.request<string>('GET', `/maintenance?booth=${boothId}`, undefined, { accept: 'text/html' })
      expect(mt.status).toBe(200)
      expect(mt.body).not.toContain('data-testid="filter-change-form"')
    }
  })
})
