import { describe, expect, it } from 'vitest'
import type { Kysely } from 'kysely'
import type { Database } from '../../../server/db/database'
import { AlertRuntime } from '../../../server/alerts/runtime'
import type { ReadingRow } from '../../../server/telemetry/reading-row'

// The ingest hot path: readings go through the in-memory evaluator only. The database here throws on any use,
// so a query per reading would fail the test.
const noDb = new Proxy({}, { get: (_t, p) => { throw new Error(`database used on the hot path (${String(p)})`) } }) as Kysely<Database>

const t0 = Date.parse('2026-03-10T10:00:00Z')
const row = (i: number, extra: Partial<ReadingRow> = {}): ReadingRow => ({
  boothId: 1,
  tsMs: t0 + i * 1000,
  receivedMs: t0 + i * 1000 + 40,
  deviceId: 'larkspur-downdraft-1',
  seq: i,
  airTempC: 21 + (i % 7) * 0.1,
  rhPct: 54.6 + (i % 5) * 0.2,
  panelTempC: 20.8,
  airflowMps: 0.42,
  boothDpPa: 6,
  intakeFilterDpPa: 100,
  exhaustFilterDpPa: 90,
  heaterOn: false,
  dewPointC: 11,
  ...extra,
})

describe('alert runtime on the ingest path', () => {
  it('evaluates every reading in memory with no query, quickly', () => {
    const r = new AlertRuntime(noDb)
    r.onMode(1, 'spray')
    const n = 200_000
    const start = performance.now()
    for (let i = 0; i < n; i++) r.onAccepted(row(i))
    const usPerReading = ((performance.now() - start) * 1000) / n
    // Ten default watches; a generous bound so a slow CI machine passes, yet a query or a rebuild per reading
    // (milliseconds) would not.
    expect(usPerReading).toBeLessThan(50)
    expect(r.stats()).toMatchObject({ booths: 1, queued: 0 })
  })

  it('queues the events it finds for the next drain, and the application window watch too', () => {
    const r = new AlertRuntime(noDb)
    r.onMode(1, 'spray')
    // Humidity at 80 %: the drift watch opens when its first 1-minute average closes (far above the 55 % target),
    // the humidity band watch after 2 minutes.
    for (let i = 0; i <= 119; i++) r.onAccepted(row(i, { rhPct: 80 }))
    expect(r.stats().queued).toBe(1)
    for (let i = 120; i <= 180; i++) r.onAccepted(row(i, { rhPct: 80 }))
    expect(r.stats().queued).toBe(2)
    r.setApplicationWindow(1, { minTempC: 25 })
    expect(r.applicationWindow(1)).toEqual({ minTempC: 25 })
    // 21 °C against a 25 °C minimum: the application window opens after a minute.
    for (let i = 181; i <= 240; i++) r.onAccepted(row(i, { rhPct: 80 }))
    expect(r.stats().queued).toBe(2)
    r.onAccepted(row(241, { rhPct: 80 }))
    expect(r.stats().queued).toBe(3)
    // The job step ends: the application window alert ends with it.
    r.setApplicationWindow(1, null)
    expect(r.stats().queued).toBe(4)
  })
})
