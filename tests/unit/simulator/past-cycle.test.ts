import { describe, expect, it } from 'vitest'
import { planMinutes, simulatePlannedCycle, type PlannedSegment } from '../../../simulator/past-cycle'

const START = Date.UTC(2026, 5, 1, 8)
const MIN = 60_000
const PLAN: PlannedSegment[] = [
  { mode: 'idle', minutes: 5 },
  { mode: 'spray', minutes: 6 },
  { mode: 'flash', minutes: 10 },
  { mode: 'spray', minutes: 5 },
  { mode: 'flash', minutes: 10 },
  { mode: 'bake', minutes: 70 },
  { mode: 'cool', minutes: 10 },
]

describe('simulatePlannedCycle', () => {
  const cycle = simulatePlannedCycle({ booth: 'downdraft-2', seed: 'plan-test', startMs: START, plan: PLAN })

  it('puts one coat on each spray segment and the bake on the bake segment', () => {
    expect(planMinutes(PLAN)).toBe(116)
    expect(cycle.coats).toEqual([
      { startMs: START + 5 * MIN, endMs: START + 11 * MIN },
      { startMs: START + 21 * MIN, endMs: START + 26 * MIN },
    ])
    expect(cycle.bake).toEqual({ startMs: START + 36 * MIN, endMs: START + 106 * MIN })
    expect(cycle.endMs).toBe(START + 116 * MIN)
  })

  it('sends a reading every second, in the planned mode', () => {
    expect(cycle.readings).toHaveLength(116 * 60)
    const at = (ms: number) => cycle.readings.find((r) => r.tsMs === ms)!
    expect(at(START + 8 * MIN).mode).toBe('spray')
    expect(at(START + 15 * MIN).mode).toBe('flash')
    expect(at(START + 100 * MIN).mode).toBe('bake')
    expect(at(START + 110 * MIN).mode).toBe('cool')
  })

  it('heats the panel to the bake temperature during the bake segment (heater on), and back down after it', () => {
    const bake = cycle.readings.filter((r) => r.tsMs > START + 95 * MIN && r.tsMs <= START + 106 * MIN)
    expect(bake.every((r) => r.reading.heaterOn === true)).toBe(true)
    expect(Math.min(...bake.map((r) => r.reading.panelTempC!))).toBeGreaterThan(55)
    const spray = cycle.readings.filter((r) => r.mode === 'spray')
    expect(Math.max(...spray.map((r) => r.reading.panelTempC!))).toBeLessThan(30)
  })
})
