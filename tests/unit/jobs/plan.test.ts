import { describe, expect, it } from 'vitest'
import { flashProgress } from '#shared/cure'
import { toFlashSpec } from '#shared/specs/engine-inputs'
import { evaluateGuards, latestCoat, nextCoatOf, planComplete, readingAt } from '../../../server/domain/coats'
import { coat, MIN, PRIMER, REFERENCE, series, steps, T0 } from './fixtures'

describe('the finish plan', () => {
  it('starts with coat 1 of the first step and no flash to wait for', () => {
    const n = nextCoatOf(steps(), [])!
    expect(n).toMatchObject({ coatNumber: 1, previous: null, stage: null })
    expect(n.step.position).toBe(1)
  })

  it('waits for the flash between coats within a product, and the flash before the next product across', () => {
    const st = steps()
    const c1 = coat(11, 1, T0, T0 + 2 * MIN)
    expect(nextCoatOf(st, [c1])).toMatchObject({ coatNumber: 2, stage: 'between-coats', previous: c1 })
    const c2 = coat(11, 2, T0 + 8 * MIN, T0 + 10 * MIN)
    const n = nextCoatOf(st, [c1, c2])!
    expect(n.step.id).toBe(12)
    expect(n).toMatchObject({ coatNumber: 1, stage: 'before-next', previous: c2 })
    expect(n.previousStep?.id).toBe(11)
  })

  it('follows the plan order, not the step ids, and ends when every coat is sprayed', () => {
    const st = steps().map((s) => ({ ...s, position: 5 - s.position })) // reversed: clearcoat first
    expect(nextCoatOf(st, [])!.step.id).toBe(14)
    const all = steps().flatMap((s, i) => Array.from({ length: s.coats_planned }, (_, k) => coat(s.id, k + 1, T0 + (i * 3 + k) * 10 * MIN, T0 + (i * 3 + k) * 10 * MIN + MIN)))
    expect(nextCoatOf(steps(), all)).toBeNull()
    expect(planComplete(steps(), all)).toBe(true)
    expect(planComplete(steps(), all.slice(0, -1))).toBe(false)
    expect(latestCoat(all)).toBe(all.at(-1))
  })
})

describe('guard rails before a coat', () => {
  const limits = { minTempC: 15, maxTempC: 35, minRhPct: 20, maxRhPct: 80 }

  it('pass at reference conditions once the flash is complete', () => {
    const prev = coat(11, 1, T0, T0 + 2 * MIN)
    const samples = series(T0, T0 + 20 * MIN, REFERENCE)
    const at = T0 + 8 * MIN // 6 min after the coat; primer flash 5 min at 20 °C
    const result = flashProgress(toFlashSpec(PRIMER.product, PRIMER.fields), samples, T0 + 2 * MIN, at)
    const g = evaluateGuards({ atMs: at, flash: { previous: prev, stage: 'between-coats', revision: PRIMER, result }, limits, reading: readingAt(samples, at) })
    expect(g.tripped).toEqual([])
    expect(g.startCheck.flash).toMatchObject({ kind: 'between_coats', waitedMinutes: 6, ready: true })
    expect(g.startCheck.flash!.requiredMinutes).toBeCloseTo(5, 3)
    expect(g.startCheck.condensation!.ok).toBe(true)
  })

  it('trip on an early start, naming the flash and when it will be ready', () => {
    const prev = coat(11, 1, T0, T0 + 2 * MIN)
    const samples = series(T0, T0 + 20 * MIN, REFERENCE)
    const at = T0 + 4 * MIN
    const result = flashProgress(toFlashSpec(PRIMER.product, PRIMER.fields), samples, T0 + 2 * MIN, at)
    const g = evaluateGuards({ atMs: at, flash: { previous: prev, stage: 'between-coats', revision: PRIMER, result }, limits, reading: readingAt(samples, at) })
    expect(g.tripped.map((t) => t.kind)).toEqual(['flash_not_complete'])
    expect(g.tripped[0]!.detail).toMatch(/40 % after 2 min/)
    expect(g.startCheck.flash).toMatchObject({ ready: false, progress: 0.4 })
  })

  it('trip outside the application window and near the dew point', () => {
    // 12 °C air, 90 % RH, panel 11 °C: dew point ≈ 10.4 °C (Magnus), margin ≈ 0.6 °C < 3 °C.
    const samples = series(T0 - 5 * MIN, T0, { airTempC: 12, rhPct: 90, panelTempC: 11, airflowMps: 0.3 })
    const g = evaluateGuards({ atMs: T0, flash: null, limits, reading: readingAt(samples, T0) })
    expect(g.tripped.map((t) => t.kind)).toEqual(['outside_application_window', 'condensation_guard'])
    expect(g.tripped[0]!.detail).toMatch(/air temperature 12 °C is below the data sheet's minimum 15 °C/)
    expect(g.tripped[0]!.detail).toMatch(/relative humidity 90 % is above/)
    expect(g.startCheck.condensation!.marginC).toBeLessThan(3)
  })

  it('trip when there is no current reading (nothing to check against)', () => {
    const old = series(T0 - 30 * MIN, T0 - 10 * MIN, REFERENCE)
    const g = evaluateGuards({ atMs: T0, flash: null, limits, reading: readingAt(old, T0) })
    expect(g.tripped.map((t) => t.kind)).toEqual(['outside_application_window', 'condensation_guard'])
    expect(g.tripped[1]!.detail).toMatch(/No current reading/)
  })
})
