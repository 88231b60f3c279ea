import { describe, expect, it } from 'vitest'
import { driftTrendPct } from '../../../simulator/drift'

describe('driftTrendPct', () => {
  it('grows linearly for ever without episodes', () => {
    expect(driftTrendPct(0, 4)).toBe(0)
    expect(driftTrendPct(2.5, 4)).toBe(10)
    expect(driftTrendPct(100, -1)).toBe(-100)
  })

  it('rises to the peak, holds, falls back at the same rate, rests, and repeats', () => {
    const ep = { peakPct: 10, holdHours: 1, restHours: 20 } // ramps of 2.5 h at 4 points/h: a 26 h cycle
    const at = (h: number) => driftTrendPct(h, 4, ep)
    expect([0, 1.25, 2.5, 3, 3.5, 4.75, 6, 10, 25.9].map(at)).toEqual([0, 5, 10, 10, 10, 5, 0, 0, 0])
    expect(at(26 + 1.25)).toBeCloseTo(5, 10)
    expect(at(52 + 3)).toBeCloseTo(10, 10)
  })

  it('follows the sign of the rate, and is flat for a zero rate', () => {
    expect(driftTrendPct(3, -4, { peakPct: 10, holdHours: 1, restHours: 2 })).toBe(-10)
    expect(driftTrendPct(3, 0, { peakPct: 10, holdHours: 1, restHours: 2 })).toBe(0)
  })
})
