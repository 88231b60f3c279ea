import { describe, expect, it } from 'vitest'
import { activationEnergyFromQ10 } from '#shared/cure'
import { detectPhases } from '#shared/bake/phases'
import { applicableSchedules, holdTargetOf, judgeBake, judgeSchedule, minutesText, type BakeSchedule } from '#shared/bake/verdict'
import { MIN, T0, series, simulatedBake } from './helpers'

const R = 8.314462618 // J/(mol·K), CODATA 2018
const K = 273.15

function schedule(specTempC: number, requiredMinutes: number, o: Partial<BakeSchedule> & { eaJPerMol?: number; minCureTempC?: number } = {}): BakeSchedule {
  return {
    key: o.key ?? `s-${specTempC}-${requiredMinutes}-${o.jobId ?? 1}`,
    label: o.label ?? `${requiredMinutes} min at ${specTempC} °C`,
    spec: { specTempC, requiredMinutes, minCureTempC: o.minCureTempC ?? 40, eaJPerMol: o.eaJPerMol ?? 0 },
    jobId: o.jobId ?? 1,
    jobNumber: o.jobNumber ?? 'RO-1',
    revisionId: o.revisionId ?? 1,
    productName: o.productName ?? '2K high-solids clearcoat',
  }
}

// Ea whose Arrhenius factor is exactly 2 between 60 and 70 °C (activationEnergyFromQ10(2, 60)).
const EA_Q10_2_AT_60 = (R * Math.log(2)) / (1 / (60 + K) - 1 / (70 + K))

describe('cure credit and pass / fail against hand-computed values', () => {
  it('the power-cut bake fails with the reason spelt out (Ea = 0, so every minute ≥ 40 °C counts 1:1)', () => {
    // The power-cut series of phases.test.ts: one reading a minute; panel ≥ 40 °C from the 15 min reading
    // (22 + 1.9·10 = 41 °C) to the last reading at 39 min (50 °C), which the cure engine holds for 2 min.
    // Cure credit = (39 − 15) + 2 = 26 min < 30 → fail. At ≥ 60 °C: readings 25…35 min → 11 min.
    const cut = (sec: number) => {
      const m = sec / 60
      if (m > 39) return null
      if (m < 5) return 22
      if (m <= 25) return 22 + (38 * (m - 5)) / 20
      if (m <= 35) return 60
      return 60 - 2.5 * (m - 35)
    }
    const v = judgeSchedule(schedule(60, 30), series(60 * 60, 60, cut), T0, T0 + 60 * MIN)
    expect(v.equivalentMinutes).toBeCloseTo(26, 9)
    expect(v.heldMinutes).toBeCloseTo(11, 9)
    expect(v.verdict).toBe('fail')
    expect(v.uncertain).toBe(true)
    expect(v.completeAtMs).toBeNull()
    expect(v.reason).toBe('held 11 min at ≥ 60 °C; needs 30 min equivalent; cure credit 26 min (readings missing for part of the bake) → fail')
  })

  it('20 min at 60 °C then 20 min at 50 °C: 29.58 equivalent minutes → fail (Arrhenius, Q10 = 2 about 60 °C)', () => {
    // Ea/R = ln 2 / (1/333.15 − 1/343.15) = 0.693147 / 8.74734e-5 = 7924.1 K.
    // Factor at 50 °C = exp(−7924.1 · (1/323.15 − 1/333.15)) = exp(−7924.1 · 9.28872e-5) = exp(−0.73605) = 0.47901.
    // Credit = 20 · 1 + 20 · 0.47901 = 29.580 min < 30.
    const factor50 = Math.exp((-EA_Q10_2_AT_60 / R) * (1 / (50 + K) - 1 / (60 + K)))
    expect(factor50).toBeCloseTo(0.47901, 4)
    const s = series(40 * 60, 60, (sec) => (sec < 20 * 60 ? 60 : 50))
    const v = judgeSchedule(schedule(60, 30, { eaJPerMol: EA_Q10_2_AT_60 }), s, T0, T0 + 40 * MIN)
    expect(v.equivalentMinutes!).toBeCloseTo(20 + 20 * factor50, 6)
    expect(v.equivalentMinutes!).toBeCloseTo(29.58, 2)
    expect(v.verdict).toBe('fail')
    expect(v.heldMinutes).toBe(20)
    expect(v.reason).toBe('held 20 min at ≥ 60 °C; needs 30 min equivalent; cure credit 29.6 min → fail')
  })

  it('20 min at 60 °C then 70 °C passes, complete 5 min into the 70 °C stretch (factor 2 exactly)', () => {
    // 20 min · 1 = 20; the remaining 10 equivalent minutes at factor 2 take 5 min → complete at 25 min.
    // By the end (40 min) the credit is 20 + 20 · 2 = 60 min.
    const s = series(40 * 60, 60, (sec) => (sec < 20 * 60 ? 60 : 70))
    const v = judgeSchedule(schedule(60, 30, { eaJPerMol: EA_Q10_2_AT_60 }), s, T0, T0 + 40 * MIN)
    expect(EA_Q10_2_AT_60).toBeCloseTo(activationEnergyFromQ10(2, 60), 6)
    expect(v.verdict).toBe('pass')
    expect(v.equivalentMinutes!).toBeCloseTo(60, 6)
    expect((v.completeAtMs! - T0) / MIN).toBeCloseTo(25, 6)
    expect(v.reason).toMatch(/→ pass$/)
  })

  it('a running bake is pending with a projected "complete at": 10 min done at 60 °C → 20 more minutes', () => {
    const s = series(10 * 60, 30, () => 60)
    const now = T0 + 10 * MIN
    const v = judgeSchedule(schedule(60, 30), s, T0, now, { running: true })
    expect(v.verdict).toBe('pending')
    expect(v.equivalentMinutes).toBeCloseTo(10, 9)
    expect(v.completeAtMs).toBe(now + 20 * MIN)
    // The same bake, ended now: fail, and no completion time.
    const ended = judgeSchedule(schedule(60, 30), s, T0, now)
    expect(ended.verdict).toBe('fail')
    expect(ended.completeAtMs).toBeNull()
  })

  it('below the minimum cure temperature nothing counts', () => {
    const v = judgeSchedule(schedule(60, 30, { minCureTempC: 40 }), series(60 * 60, 60, () => 39.9), T0, T0 + 60 * MIN)
    expect(v.equivalentMinutes).toBe(0)
    expect(v.verdict).toBe('fail')
  })

  it('without a panel sensor the air temperature goes through the heat-up lag and the verdict says "estimated"', () => {
    const s = series(60 * 60, 60, () => null, () => null, () => 60)
    const v = judgeSchedule(schedule(60, 30), s, T0, T0 + 60 * MIN)
    expect(v.estimated).toBe(true)
    expect(v.reason).toContain('panel temperature estimated from air')
    expect(v.verdict).toBe('pass')
  })

  it('an unusable schedule is unknown, never a pass', () => {
    const v = judgeSchedule(schedule(60, 0), series(60 * 60, 60, () => 60), T0, T0 + 60 * MIN)
    expect(v.verdict).toBe('unknown')
    expect(v.equivalentMinutes).toBeNull()
  })
})

describe('combining schedules and products', () => {
  const s = series(40 * 60, 60, () => 60) // 40 min at 60 °C
  it('a product passes when one of its alternative schedules does', () => {
    // 40 min at 60 °C: "30 min at 60 °C" passes; "45 min at 60 °C" fails; one product (same job and revision).
    const j = judgeBake([schedule(60, 45), schedule(60, 30, { key: 'alt' })], s, T0, T0 + 40 * MIN)
    expect(j.products).toHaveLength(1)
    expect(j.products[0]!.schedules.map((x) => x.verdict)).toEqual(['fail', 'pass'])
    expect(j.verdict).toBe('pass')
  })

  it('the bake fails when one product fails, and holds the highest schedule temperature', () => {
    const j = judgeBake([schedule(60, 30, { jobId: 1 }), schedule(60, 50, { jobId: 2, revisionId: 2 })], s, T0, T0 + 40 * MIN)
    expect(j.products.map((p) => p.verdict)).toEqual(['pass', 'fail'])
    expect(j.verdict).toBe('fail')
    expect(j.holdTargetC).toBe(60)
  })

  it('hold target: per product the lowest alternative, then the highest over the products', () => {
    // Clear: 60 °C / 30 min or 70 °C / 15 min → 60; primer: 65 °C / 20 min → 65; an air-dry schedule never counts.
    const t = holdTargetOf([
      schedule(60, 30, { jobId: 1 }),
      schedule(70, 15, { jobId: 1, key: 'b' }),
      schedule(65, 20, { jobId: 2, revisionId: 2 }),
      schedule(20, 960, { jobId: 3, revisionId: 3 }),
    ])
    expect(t).toBe(65)
    expect(holdTargetOf([schedule(20, 960)])).toBeNull()
  })

  it('"cure complete at" of a running bake is the latest of the products', () => {
    const now = T0 + 10 * MIN
    const j = judgeBake([schedule(60, 20, { jobId: 1 }), schedule(60, 30, { jobId: 2, revisionId: 2 })], series(10 * 60, 60, () => 60), T0, now, { running: true })
    expect(j.verdict).toBe('pending')
    expect(j.cureCompleteAtMs).toBe(now + 20 * MIN)
  })

  it('no schedule: unknown; air-dry schedules are not judged against a bake when a bake schedule exists', () => {
    expect(judgeBake([], s, T0, T0 + 40 * MIN).verdict).toBe('unknown')
    const both = [schedule(20, 16 * 60), schedule(60, 30)]
    expect(applicableSchedules(both).map((x) => x.spec.specTempC)).toEqual([60])
    expect(applicableSchedules([schedule(20, 16 * 60)]).map((x) => x.spec.specTempC)).toEqual([20])
  })

  it('a simulated bake (30 min hold at 60 °C) passes "30 min at 60 °C" but not "45 min at 60 °C"', () => {
    const b = simulatedBake({ seed: 7, dropouts: true })
    const ph = detectPhases(b.samples, b.startMs, b.endMs, { targetC: 60 })
    const ea = activationEnergyFromQ10(2, 60)
    const j = judgeBake([schedule(60, 30, { eaJPerMol: ea }), schedule(60, 45, { eaJPerMol: ea, jobId: 2, revisionId: 2 })], b.samples, b.startMs, b.endMs)
    const [ok, long] = j.products
    expect(ok!.verdict).toBe('pass')
    expect(long!.verdict).toBe('fail')
    // Credit covers the hold and the hot part of ramp and cool: more than the hold, less than the whole bake.
    const eq = ok!.schedules[0]!.equivalentMinutes!
    expect(eq).toBeGreaterThan(ph.holdMinutes)
    expect(eq).toBeLessThan((b.endMs - b.startMs) / MIN)
  })

  it('formats minutes plainly', () => {
    expect(minutesText(24.46)).toBe('24.5')
    expect(minutesText(30)).toBe('30')
    expect(minutesText(29.96)).toBe('30')
  })
})
