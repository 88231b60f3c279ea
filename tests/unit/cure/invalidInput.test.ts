import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import * as cure from '#shared/cure'

// Contract (DESIGN §6): every formula returns NaN (or a result with NaN / null fields) on invalid input and never
// throws. fast-check feeds arbitrary values (objects, arrays, strings, NaN, ±Infinity, null, …) to each function.
const anyArgs = fc.array(fc.anything({ withBigInt: true, withDate: true, withMap: true, withSet: true, withTypedArray: true, withSparseArray: true }), { maxLength: 6 })

describe('garbage in: NaN out, never a throw', () => {
  type AnyFn = (...a: unknown[]) => unknown
  const callables: [string, AnyFn][] = []
  for (const [name, value] of Object.entries(cure) as [string, unknown][]) {
    if (typeof value === 'function') callables.push([name, value as AnyFn])
  }

  it('covers every exported function', () => {
    expect(callables.length).toBeGreaterThan(30)
  })

  it.each(callables.map(([name, fn]) => [name, fn] as const))('%s does not throw', (_name, fn) => {
    fc.assert(
      fc.property(anyArgs, (args) => {
        fn(...args)
      }),
      { numRuns: 200 },
    )
  })

  it('scalar functions return NaN for non-numbers', () => {
    const scalar = [
      cure.saturationVapourPressurePa, cure.cToF, cure.fToC, cure.deltaCToF, cure.deltaFToC, cure.mpsToFpm, cure.fpmToMps,
      cure.paToInH2O, cure.inH2OToPa, cure.kPaToPsi, cure.psiToKPa,
    ] as ((x: unknown) => number)[]
    fc.assert(
      fc.property(fc.oneof(fc.string(), fc.constant(null), fc.constant(undefined), fc.object(), fc.constant(Number.NaN), fc.constant(Number.NEGATIVE_INFINITY), fc.bigInt()), (x) => {
        for (const f of scalar) expect(f(x)).toBeNaN()
      }),
    )
    expect(cure.dewPointC('20' as never, 50)).toBeNaN()
    expect(cure.arrheniusFactor(20, 60, -1)).toBeNaN()
  })

  it('series functions return NaN results for garbage specs, series and times', () => {
    const bad = fc.oneof(fc.anything(), fc.constant({ chemistry: 'solvent', flashMinMinutes: -1, flashMaxMinutes: 2 }))
    fc.assert(
      fc.property(bad, fc.anything(), (spec, samples) => {
        const flash = cure.flashProgress(spec as never, samples as never, Number.NaN, 0)
        expect(flash.progress).toBeNaN()
        expect(flash.readyAtMs).toBeNull()
        expect(flash.reasons).toEqual(['invalid-input'])
        expect(cure.potLife(spec as never, [], 0, -1).usedFraction).toBeNaN()
        expect(cure.cureCredit(spec as never, [], 10, 0).equivalentMinutes).toBeNaN()
        expect(cure.integrateRate(samples as never, 0, 1, () => 1, { maxHoldMs: Number.NaN }).integral).toBeNaN()
      }),
    )
    // A good spec with garbage times / options is still invalid, not a throw.
    const good = { chemistry: 'solvent', flashMinMinutes: 5, flashMaxMinutes: 10 } as const
    expect(cure.flashProgress(good, [], 100, 50).progress).toBeNaN()
    expect(cure.flashProgress(good, [], 0, 50, 'fast' as never).progress).toBeNaN()
    expect(cure.cureCredit({ specTempC: 60, requiredMinutes: 30, minCureTempC: 70, eaJPerMol: 5e4 }, [], 0, 1).progress).toBeNaN()
  })
})
