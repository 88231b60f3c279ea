import { describe, expect, it } from 'vitest'
import { formatMinutes, previewRevision } from '../../../server/domain/spec-preview'
import { fields } from './fixtures'

const solvent2K = { chemistry: 'solvent', components: 2 } as const
const rev = fields({
  potLifeMinutes: 60,
  mixRatio: '4:1',
  reducerBands: [
    { fromC: null, toC: 18, grade: 'Fast' },
    { fromC: 18, toC: null, grade: 'Slow' },
  ],
  minAirTempC: 15,
  bakeSchedules: [{ objectTempC: 60, minutes: 30 }],
  sandPolishMinutes: 960,
  minCureTempC: 10,
})

describe('previewRevision (constant conditions)', () => {
  it('gives the TDS times back at the reference conditions', () => {
    const p = previewRevision(solvent2K, rev, { airTempC: 20, rhPct: 50 })
    expect(p.flash.rate).toBeCloseTo(1, 9)
    expect(p.flash.betweenCoats.min.minutes).toBeCloseTo(5, 6)
    expect(p.flash.betweenCoats.max.minutes).toBeCloseTo(10, 6)
    expect(p.flash.beforeNext.minutes).toBeCloseTo(15, 6)
    expect(p.potLife!.minutes).toBeCloseTo(60, 6)
    expect(p.airDry.sandPolish!.minutes).toBeCloseTo(960, 3)
  })

  it('stretches flash and pot life when colder (Q10 2: 10 °C colder, twice as long)', () => {
    const p = previewRevision(solvent2K, rev, { airTempC: 10, rhPct: 50 })
    expect(p.flash.betweenCoats.min.minutes).toBeCloseTo(10, 6)
    expect(p.potLife!.minutes).toBeCloseTo(120, 6)
    expect(p.reducer.advised).toBe('Fast')
    expect(p.application.problems).toEqual([{ channel: 'airTempC', value: 10, limit: 15, kind: 'below' }])
    expect(p.summary.join(' ')).toMatch(/air temperature below 15 °C/)
  })

  it('counts cure credit on the panel temperature: the schedule time at a cooler panel gives part of the credit', () => {
    const at60 = previewRevision(solvent2K, rev, { airTempC: 60, rhPct: 10, panelTempC: 60 })
    expect(at60.cure.schedules[0]!.creditFraction).toBeCloseTo(1, 6)
    const at50 = previewRevision(solvent2K, rev, { airTempC: 60, rhPct: 10, panelTempC: 50 })
    const s = at50.cure.schedules[0]!
    expect(s.creditFraction).toBeGreaterThan(0.3)
    expect(s.creditFraction).toBeLessThan(1)
    expect(s.minutesToComplete! * s.creditFraction!).toBeCloseTo(30, 3)
    expect(at50.cure.panelAssumed).toBe(false)
  })

  it('gives no credit below the minimum cure temperature', () => {
    const p = previewRevision(solvent2K, rev, { airTempC: 5, rhPct: 50 })
    expect(p.cure.schedules[0]!.minutesToComplete).toBeNull()
    expect(p.cure.schedules[0]!.creditMinutes).toBe(0)
  })

  it('slows a waterborne flash in humid, still air', () => {
    const wb = { chemistry: 'waterborne', components: 1 } as const
    const wbRev = fields({ flashMinMinutes: 4, flashMaxMinutes: 8 })
    const dry = previewRevision(wb, wbRev, { airTempC: 20, rhPct: 50, airflowMps: 0.3 })
    const humid = previewRevision(wb, wbRev, { airTempC: 20, rhPct: 75, airflowMps: 0.3 })
    const still = previewRevision(wb, wbRev, { airTempC: 20, rhPct: 50, airflowMps: 0.1 })
    expect(dry.flash.betweenCoats.min.minutes).toBeCloseTo(4, 6)
    expect(humid.flash.betweenCoats.min.minutes).toBeCloseTo(8, 6)
    expect(still.flash.betweenCoats.min.minutes!).toBeGreaterThan(6)
    expect(previewRevision(wb, wbRev, { airTempC: 20, rhPct: 50 }).flash.airflowAssumed).toBe(true)
  })

  it('words times for people', () => {
    expect(formatMinutes(4.25)).toBe('4.3 min')
    expect(formatMinutes(42.4)).toBe('42 min')
    expect(formatMinutes(130)).toBe('2 h 10 min')
    expect(formatMinutes(null)).toMatch(/no end/)
  })
})

describe('snapToCurrent (no change from display rounding)', () => {
  it('keeps stored numbers that came back a few thousandths off, and takes real changes', async () => {
    const { snapToCurrent } = await import('../../../server/domain/specs')
    const current = fields({ minAirTempC: 17.333, reducerBands: [{ fromC: null, toC: 18.004, grade: 'Fast' }] })
    const next = fields({ minAirTempC: 17.3333, coats: 3, reducerBands: [{ fromC: null, toC: 18.0, grade: 'Fast' }] })
    const snapped = snapToCurrent(current, next)
    expect(snapped.minAirTempC).toBe(17.333)
    expect(snapped.reducerBands[0]!.toC).toBe(18.004)
    expect(snapped.coats).toBe(3)
    expect(snapToCurrent(current, fields({ minAirTempC: 17.4 })).minAirTempC).toBe(17.4)
  })
})
