import { describe, expect, it } from 'vitest'
import { conditionStats, readingCoverage, thin, wholeMinutes, type EnvPoint } from '../../../server/evidence/coverage'

const p = (t: number, air: number | null, rh: number | null, dp: number | null, panel: number | null = null): EnvPoint => ({ t, airTempC: air, rhPct: rh, panelTempC: panel, airflowMps: 0.4, dewPointC: dp })

describe('conditions over a span', () => {
  it('gives min / mean / max within [from, to) only', () => {
    const s = conditionStats([p(0, 10, 50, 0), p(1000, 20, 60, 5), p(2000, 30, 70, 10), p(3000, 99, 99, 0)], 0, 3000)
    expect(s.n).toBe(3)
    expect(s.airTempC).toEqual({ min: 10, max: 30, mean: 20 })
    expect(s.rhPct).toEqual({ min: 50, max: 70, mean: 60 })
    // Margin = air − dew point: 10, 15, 20.
    expect(s.dewPointMarginC).toEqual({ min: 10, max: 20, mean: 15 })
  })

  it('uses the panel temperature for the margin when it is measured, and null when nothing was', () => {
    expect(conditionStats([p(0, 20, 50, 10, 12)], 0, 1).dewPointMarginC!.mean).toBe(2)
    const empty = conditionStats([p(0, null, null, null)], 0, 1)
    expect(empty.n).toBe(1)
    expect(empty.airTempC).toBeNull()
    expect(empty.dewPointMarginC).toBeNull()
  })
})

describe('reading coverage', () => {
  const M = 60_000
  it('states the gaps found and the rows against one per second', () => {
    const c = readingCoverage(3000, [{ from: 10 * M, to: 20 * M }], 0, 60 * M, 5)
    expect(c.gaps).toEqual([{ from: new Date(10 * M).toISOString(), to: new Date(20 * M).toISOString(), minutes: 10 }])
    expect(c.expectedRows).toBe(3600)
    expect(c.ratio).toBeCloseTo(3000 / 3600, 6)
    expect(c.minGapMinutes).toBe(5)
  })

  it('looks for gaps in the whole minutes of the period only', () => {
    expect(wholeMinutes(30_000, 10 * M + 5_000)).toEqual({ first: M, last: 10 * M })
    expect(wholeMinutes(0, 10 * M)).toEqual({ first: 0, last: 10 * M })
  })

  it('thins evenly', () => {
    expect(thin([1, 2, 3, 4, 5, 6], 3)).toEqual([1, 3, 5])
    expect(thin([1, 2], 3)).toEqual([1, 2])
  })
})
