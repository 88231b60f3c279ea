import { describe, expect, it } from 'vitest'
import { coatVerdict, conditionsText, type VerdictInput } from '../../../server/evidence/verdict'
import type { ConditionStats } from '../../../server/evidence/types'

const stats: ConditionStats = {
  n: 540,
  airTempC: { min: 16.6, max: 17.4, mean: 17.0 },
  rhPct: { min: 62, max: 66, mean: 64.2 },
  panelTempC: null,
  dewPointMarginC: { min: 6, max: 7, mean: 6.5 },
  airflowMps: { min: 0.3, max: 0.5, mean: 0.42 },
}
const base: VerdictInput = {
  finished: true,
  hasNextCoat: true,
  lastOfPlan: false,
  waitedMinutes: 9,
  requiredMinutes: 7.5,
  progress: 1.2,
  recoatWindowPassed: false,
  recoatWindowMinutes: null,
  uncertain: false,
  reasons: [],
  stats,
  waterborne: false,
  overrideReasons: [],
}

describe('coat verdicts', () => {
  it('states the wait against the flash needed at the measured conditions', () => {
    expect(coatVerdict(base)).toEqual({ code: 'followed', reason: 'waited 9 min; 7.5 min needed at 17 °C / 64 % RH → followed the data sheet' })
  })

  it('calls a recoat before the flash was complete too early, with the painter’s reason', () => {
    const v = coatVerdict({ ...base, waitedMinutes: 4, progress: 0.55, overrideReasons: ['customer waiting'] })
    expect(v.code).toBe('too_early')
    expect(v.reason).toBe('waited 4 min; 7.5 min needed at 17 °C / 64 % RH → recoated before the flash-off was complete; painter\'s reason: "customer waiting"')
  })

  it('flags an explicit recoat window that had passed', () => {
    const v = coatVerdict({ ...base, waitedMinutes: 95, progress: 9, recoatWindowPassed: true, recoatWindowMinutes: 60 })
    expect(v.code).toBe('past_window')
    expect(v.reason).toContain('recoat window 60 min')
  })

  it('cannot judge without readings, and says so', () => {
    expect(coatVerdict({ ...base, stats: { ...stats, n: 0 } }).code).toBe('unknown')
    expect(coatVerdict({ ...base, progress: Number.NaN }).code).toBe('unknown')
  })

  it('marks estimates, the last coat and a coat still in progress', () => {
    expect(coatVerdict({ ...base, uncertain: true, reasons: ['data-gap'] }).reason).toMatch(/estimate: readings missing/)
    expect(coatVerdict({ ...base, hasNextCoat: false, lastOfPlan: true }).code).toBe('last_coat')
    expect(coatVerdict({ ...base, hasNextCoat: false }).code).toBe('in_progress')
    expect(coatVerdict({ ...base, finished: false }).code).toBe('in_progress')
  })

  it('names airflow for waterborne products', () => {
    expect(conditionsText(stats, true)).toBe('17 °C / 64 % RH / 0.4 m/s')
    expect(conditionsText(null, false)).toBe('')
  })
})
