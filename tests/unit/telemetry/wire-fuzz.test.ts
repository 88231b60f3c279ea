import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { REJECT_REASONS, validateReading } from '../../../server/telemetry/wire'

const now = Date.UTC(2026, 11, 1, 12, 0, 0)
const DAY = 86_400_000

describe('validateReading under arbitrary input', () => {
  it('never throws and answers ok or one known reason for any bytes', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 9000 }), (bytes) => {
        const r = validateReading(Buffer.from(bytes), now, DAY)
        expect(r.ok || REJECT_REASONS.includes(r.reason)).toBe(true)
      }),
      { numRuns: 2000 },
    )
  })

  it('never throws for arbitrary JSON values, and accepts exactly the well-formed readings', () => {
    const channel = fc.oneof(fc.double({ noNaN: false }), fc.string(), fc.boolean(), fc.constant(null), fc.integer())
    const reading = fc.record(
      {
        ts: fc.oneof(fc.date({ min: new Date(now - 2 * DAY), max: new Date(now + DAY), noInvalidDate: true }).map((d) => d.toISOString()), fc.string()),
        seq: fc.oneof(fc.nat(), fc.double()),
        airTempC: channel,
        rhPct: channel,
        airflowMps: channel,
        heaterOn: fc.oneof(fc.boolean(), fc.string()),
      },
      { requiredKeys: [] },
    )
    fc.assert(
      fc.property(fc.oneof(reading, fc.jsonValue()), (value) => {
        const r = validateReading(JSON.stringify(value) ?? 'undefined', now, DAY)
        if (r.ok) {
          // Whatever passes is a reading inside the wire rules.
          const v = r.reading
          expect(Math.abs(v.tsMs - now)).toBeLessThanOrEqual(DAY)
          if (v.rhPct !== undefined) expect(v.rhPct >= 0 && v.rhPct <= 100).toBe(true)
          if (v.airTempC !== undefined) expect(v.airTempC >= -40 && v.airTempC <= 150).toBe(true)
          if (v.airflowMps !== undefined) expect(v.airflowMps).toBeGreaterThanOrEqual(0)
        } else {
          expect(REJECT_REASONS).toContain(r.reason)
        }
      }),
      { numRuns: 3000 },
    )
  })

  it('accepts every reading that follows the wire rules', () => {
    const good = fc.record({
      ts: fc.integer({ min: now - DAY + 1000, max: now + 4 * 60_000 }).map((t) => new Date(t).toISOString()),
      airTempC: fc.double({ min: -40, max: 150, noNaN: true }),
      rhPct: fc.double({ min: 0, max: 100, noNaN: true }),
      airflowMps: fc.double({ min: 0, max: 50, noNaN: true }),
      heaterOn: fc.boolean(),
    })
    fc.assert(
      fc.property(good, (g) => {
        const r = validateReading(JSON.stringify(g), now, DAY)
        expect(r).toMatchObject({ ok: true })
      }),
      { numRuns: 1000 },
    )
  })
})
