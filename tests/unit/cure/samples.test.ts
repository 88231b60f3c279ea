import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import type { HeldValues, Sample } from '#shared/cure'
import { DEFAULT_MAX_HOLD_MS, holdSegments, integrateRate, projectCrossing } from '#shared/cure'
import { MIN, T0 } from './helpers'

// The reference for these checks is the hold rule itself (DESIGN §6 and the brief): a reading is held for at most
// maxHoldMs; beyond it nothing accrues and the result is uncertain. Values are worked by hand in the comments.
const airRate = (v: HeldValues) => (v.airTempC === null ? Number.NaN : v.airTempC / 10)

describe('holdSegments', () => {
  it('holds a reading for at most maxHoldMs, then reports nothing', () => {
    const s = holdSegments([{ t: T0, airTempC: 20 }], T0, T0 + 10 * MIN)
    expect(s).not.toBeNull()
    expect(s?.segments).toEqual([
      { startMs: T0, endMs: T0 + DEFAULT_MAX_HOLD_MS, values: { airTempC: 20, rhPct: null, panelTempC: null, airflowMps: null } },
      { startMs: T0 + DEFAULT_MAX_HOLD_MS, endMs: T0 + 10 * MIN, values: { airTempC: null, rhPct: null, panelTempC: null, airflowMps: null } },
    ])
    expect(s?.atNow.airTempC).toBeNull()
  })

  it('uses the last reading before start as the starting value (hold counted from the reading)', () => {
    const s = holdSegments([{ t: T0 - 5 * MIN, airTempC: 5 }, { t: T0 - MIN, airTempC: 25 }], T0, T0 + 3 * MIN)
    expect(s?.segments[0]).toMatchObject({ startMs: T0, endMs: T0 + MIN, values: { airTempC: 25 } })
    expect(s?.segments[1]?.values.airTempC).toBeNull()
  })

  it('ignores non-finite values per channel, keeps the other channels, and ignores readings after now', () => {
    const rows: Sample[] = [
      { t: T0, airTempC: 20, rhPct: 50 },
      { t: T0 + 30_000, airTempC: Number.NaN, rhPct: 60 },
      { t: T0 + 60_000, airTempC: null, rhPct: Number.POSITIVE_INFINITY },
      { t: T0 + 10 * MIN, airTempC: 99 },
    ]
    const s = holdSegments(rows, T0, T0 + 90_000)
    expect(s?.atNow).toEqual({ airTempC: 20, rhPct: 60, panelTempC: null, airflowMps: null })
  })

  it('rejects reversed or non-finite times and a bad hold', () => {
    expect(holdSegments([], T0, T0 - 1)).toBeNull()
    expect(holdSegments([], Number.NaN, T0)).toBeNull()
    expect(holdSegments([], T0, T0, { maxHoldMs: -1 })).toBeNull()
    expect(holdSegments('x' as never, T0, T0)).toBeNull()
  })
})

describe('integrateRate', () => {
  it('constant conditions: ∫ r dt = r · elapsed (20 °C → r = 2, 10 min → 20)', () => {
    const rows = Array.from({ length: 11 }, (_, i) => ({ t: T0 + i * MIN, airTempC: 20 }))
    const run = integrateRate(rows, T0, T0 + 10 * MIN, airRate)
    expect(run.integral).toBeCloseTo(20, 12)
    expect(run.uncertain).toBe(false)
    expect(run.rateNow).toBe(2)
  })

  it('a gap accrues only the hold, then nothing, and is flagged (2 min of 10 at r = 3 → 6)', () => {
    const run = integrateRate([{ t: T0, airTempC: 30 }, { t: T0 + 10 * MIN, airTempC: 30 }], T0, T0 + 10 * MIN, airRate)
    expect(run.integral).toBeCloseTo(6, 12)
    expect(run.uncoveredMs).toBe(8 * MIN)
    expect(run.uncertain).toBe(true)
  })

  it('unsorted input gives the same result as sorted input', () => {
    const rows = [10, 22, 18, 35, 27, 5].map((v, i) => ({ t: T0 + i * 45_000, airTempC: v }))
    const shuffled = [rows[3], rows[0], rows[5], rows[1], rows[4], rows[2]] as Sample[]
    const a = integrateRate(rows, T0, T0 + 5 * MIN, airRate)
    const b = integrateRate(shuffled, T0, T0 + 5 * MIN, airRate)
    expect(b.integral).toBe(a.integral)
    expect(shuffled[0]?.t).toBe(T0 + 3 * 45_000) // the caller's array is not sorted in place
  })

  it('finds the exact crossing time inside a segment (r = 2, target 5 → 2.5 min)', () => {
    const rows = Array.from({ length: 11 }, (_, i) => ({ t: T0 + i * MIN, airTempC: 20 }))
    const run = integrateRate(rows, T0, T0 + 10 * MIN, airRate, { targets: [5, 0, 1000] })
    expect(run.crossings).toEqual([T0 + 2.5 * MIN, T0, null])
  })

  it('gapRate lets a caller count gaps on purpose', () => {
    const run = integrateRate([{ t: T0, airTempC: 30 }], T0, T0 + 10 * MIN, airRate, { gapRate: (last) => last ?? 0 })
    expect(run.integral).toBeCloseTo(30, 12) // 2 min held + 8 min gap, both at r = 3
    expect(run.uncertain).toBe(true)
  })

  it('projectCrossing never returns a time before now when projecting', () => {
    expect(projectCrossing(null, T0, 5, 2)).toBe(T0 + 2.5 * MIN)
    expect(projectCrossing(null, T0, 5, 0)).toBeNull()
    expect(projectCrossing(null, T0, -1, 2)).toBeNull()
    expect(projectCrossing(T0 - MIN, T0, 0, 2)).toBe(T0 - MIN)
  })

  // Property: readings spaced further apart than the hold accrue exactly Σ hold · r_i — nothing from the gaps.
  it('gaps never create progress from nothing (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ gap: fc.integer({ min: 1, max: 30 }), temp: fc.integer({ min: 0, max: 50 }) }), { minLength: 1, maxLength: 20 }),
        fc.integer({ min: 10_000, max: 120_000 }),
        (rows, hold) => {
          let t = T0
          const samples: Sample[] = []
          for (const r of rows) {
            samples.push({ t, airTempC: r.temp })
            t += hold + r.gap * 1000 // always more than the hold
          }
          const run = integrateRate(samples, T0, t, airRate, { maxHoldMs: hold })
          const expected = rows.reduce((acc, r) => acc + ((r.temp / 10) * hold) / MIN, 0)
          expect(run.integral).toBeCloseTo(expected, 9)
          expect(run.uncertain).toBe(true)
        },
      ),
    )
  })

  it('is monotonic in now (fast-check)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ dt: fc.integer({ min: 0, max: 200_000 }), temp: fc.double({ min: 0, max: 50, noNaN: true }) }), { maxLength: 30 }),
        fc.integer({ min: 0, max: 3_000_000 }),
        fc.integer({ min: 0, max: 3_000_000 }),
        (rows, a, b) => {
          let t = T0 - 60_000
          const samples = rows.map((r) => ({ t: (t += r.dt), airTempC: r.temp }))
          const [n1, n2] = a <= b ? [a, b] : [b, a]
          const p1 = integrateRate(samples, T0, T0 + n1, airRate).integral
          const p2 = integrateRate(samples, T0, T0 + n2, airRate).integral
          expect(p2).toBeGreaterThanOrEqual(p1)
        },
      ),
    )
  })
})
