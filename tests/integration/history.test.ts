import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startTestApp, type TestApp } from '../support/app'

// History answers any range with at most a few thousand points: raw rows for short ranges, means
// over buckets for long ones (from the per-minute rollups).
let app: TestApp
let boothId: number
const start = Date.UTC(2026, 10, 30, 0, 0, 0) // two days of 1 Hz readings ending before "now"

beforeAll(async () => {
  app = await startTestApp({ BOOTHBEAT_TELEMETRY: 'off' }, { waitFor: 'http' })
  boothId = (await app.db.selectFrom('booths').select('id').where('slug', '=', 'downdraft-2').executeTakeFirstOrThrow()).id
  const { ensurePartitions } = await import('../../server/telemetry/partitions')
  const { insertReadingBatch } = await import('../../server/telemetry/insert-batch')
  await ensurePartitions(app.pool, start, start + 2 * 86_400_000)
  // Air temperature ramps 10 → 30 °C over each hour; RH constant 50 %.
  const rows = []
  for (let s = 0; s < 2 * 86_400; s++) {
    const tsMs = start + s * 1000
    rows.push({
      boothId, tsMs, receivedMs: tsMs, deviceId: 'larkspur-downdraft-2', seq: s,
      airTempC: 10 + ((s % 3600) / 3600) * 20, rhPct: 50, panelTempC: null, airflowMps: 0.4,
      boothDpPa: 5, intakeFilterDpPa: null, exhaustFilterDpPa: null, heaterOn: false, dewPointC: 5,
    })
    if (rows.length === 5000) await insertReadingBatch(app.pool, rows.splice(0))
  }
  if (rows.length) await insertReadingBatch(app.pool, rows)
}, 180_000)
afterAll(async () => {
  await app?.close()
})

type History = { resolution: string; bucketSeconds: number; count: number; t: string[]; series: Record<string, (number | null)[]> }

describe('booth history', () => {
  it('returns raw rows for a short range', async () => {
    const c = await app.as('manager')
    const from = new Date(start + 3600_000).toISOString()
    const to = new Date(start + 3600_000 + 20 * 60_000).toISOString()
    const r = await c.get<History>(`/api/booths/${boothId}/readings?from=${from}&to=${to}`)
    expect(r.status).toBe(200)
    expect(r.body.resolution).toBe('raw')
    expect(r.body.count).toBe(1200)
    expect(r.body.series.airTempC![0]).toBeCloseTo(10, 3)
    expect(r.body.series.dewPointMarginC![0]).toBeCloseTo(5, 3)
  })

  it('uses the per-minute rollups for a long range and keeps the budget', async () => {
    const c = await app.as('manager')
    const from = new Date(start).toISOString()
    const to = new Date(start + 2 * 86_400_000).toISOString()
    const r = await c.get<History>(`/api/booths/${boothId}/readings?from=${from}&to=${to}`)
    expect(r.body.resolution).toBe('minute-buckets')
    expect(r.body.count).toBeLessThanOrEqual(3000)
    expect(r.body.count).toBeGreaterThan(2000)
    // Each bucket of the hourly ramp has a mean between 10 and 30 °C, and over a whole hour ~20 °C.
    const temps = r.body.series.airTempC!.filter((v): v is number => v !== null)
    const mean = temps.reduce((a, b) => a + b, 0) / temps.length
    expect(mean).toBeCloseTo(20, 0)
    expect(Math.min(...temps)).toBeGreaterThanOrEqual(10)
    expect(Math.max(...temps)).toBeLessThanOrEqual(30)
  })

  it('buckets raw rows for a middle range', async () => {
    const c = await app.as('manager')
    const from = new Date(start).toISOString()
    const to = new Date(start + 4 * 3600_000).toISOString()
    const r = await c.get<History>(`/api/booths/${boothId}/readings?from=${from}&to=${to}`)
    expect(r.body.resolution).toBe('raw-buckets')
    expect(r.body.bucketSeconds).toBe(5)
    expect(r.body.count).toBe(2880)
  })

  it('refuses a bad range with a clear error', async () => {
    const c = await app.as('manager')
    const r = await c.get(`/api/booths/${boothId}/readings?from=yesterday`)
    expect(r.status).toBe(400)
    expect(r.body).toMatchObject({ issues: [expect.objectContaining({ path: 'from' })] })
    const reversed = await c.get(`/api/booths/${boothId}/readings?from=2026-11-02T00:00:00Z&to=2026-11-01T00:00:00Z`)
    expect(reversed.status).toBe(400)
    expect((await c.get('/api/booths/999/readings')).status).toBe(404)
  })
})
