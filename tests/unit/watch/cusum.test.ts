import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  createCusumState,
  cusumSeries,
  stepCusum,
  type CusumParams,
  type CusumState,
} from '#shared/watch'

// Source: NIST/SEMATECH e-Handbook of Statistical Methods, section 6.3.2.3 "CUSUM Control Charts"
// (https://www.itl.nist.gov/div898/handbook/pmc/section3/pmc323.htm), tabular example: target μ0 = 325, k = 0.5,
// h = 5, σ = 1, twenty measurements.
//
// Provenance: the 20 measurements are as the handbook lists them; the same series appears in two unrelated
// public code examples that cite that page, which matched the values recalled here. The S_hi / S_lo columns are
// recalled from the handbook's table (from memory, not copied), so they are also checked against this hand
// computation, with kσ = 0.5: S_hi += x − 325.5, S_lo += 324.5 − x, each floored at 0.
//
//   i   x       x−325.5  S_hi     324.5−x  S_lo
//   1   324.93  −0.57    0        −0.43    0
//   2   324.68  −0.82    0        −0.18    0
//   3   324.73  −0.77    0        −0.23    0
//   4   324.35  −1.15    0         0.15    0.15
//   5   325.35  −0.15    0        −0.85    0        (0.15 − 0.85 < 0)
//   6   325.23  −0.27    0        −0.73    0
//   7   324.13  −1.37    0         0.37    0.37
//   8   324.53  −0.97    0        −0.03    0.34
//   9   325.23  −0.27    0        −0.73    0
//  10   324.60  −0.90    0        −0.10    0
//  11   324.63  −0.87    0        −0.13    0
//  12   325.15  −0.35    0        −0.65    0
//  13   328.33   2.83    2.83     −3.83    0
//  14   327.25   1.75    4.58     −2.75    0
//  15   327.83   2.33    6.91 *   −3.33    0        first S_hi > h = 5
//  16   328.50   3.00    9.91 *   −4.00    0
//  17   326.68   1.18   11.09 *   −2.18    0
//  18   327.78   2.28   13.37 *   −3.28    0
//  19   326.88   1.38   14.75 *   −2.38    0
//  20   328.35   2.85   17.60 *   −3.85    0
const NIST_X = [
  324.93, 324.68, 324.73, 324.35, 325.35, 325.23, 324.13, 324.53, 325.23, 324.6, 324.63, 325.15, 328.33, 327.25,
  327.83, 328.5, 326.68, 327.78, 326.88, 328.35,
]
const NIST_S_HI = [0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 2.83, 4.58, 6.91, 9.91, 11.09, 13.37, 14.75, 17.6]
const NIST_S_LO = [0, 0, 0, 0.15, 0, 0, 0.37, 0.34, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0]
const NIST: CusumParams = { target: 325, sigma: 1, k: 0.5, h: 5 }

describe('tabular CUSUM against the NIST/SEMATECH e-Handbook example (6.3.2.3)', () => {
  const points = cusumSeries(NIST, NIST_X)

  it('every S_hi and S_lo matches the table', () => {
    expect(points).toHaveLength(20)
    points.forEach((p, i) => {
      expect(p.hi, `S_hi at sample ${i + 1}`).toBeCloseTo(NIST_S_HI[i]!, 9)
      expect(p.lo, `S_lo at sample ${i + 1}`).toBeCloseTo(NIST_S_LO[i]!, 9)
    })
  })

  it('signals high first at sample 15 and stays out of control to the end', () => {
    const firstOpen = points.findIndex((p) => p.event?.type === 'open')
    expect(firstOpen + 1).toBe(15)
    expect(points[firstOpen]!.event).toMatchObject({ type: 'open', side: 'high', value: 327.83 })
    expect(points[firstOpen]!.event!.sum).toBeCloseTo(6.91, 9)
    expect(points.filter((p) => p.event).length).toBe(1)
    expect(points.slice(14).every((p) => p.open === 'high')).toBe(true)
    expect(points.slice(0, 14).every((p) => p.open === null)).toBe(true)
  })

  it('with h = 4 instead the same data would signal one sample earlier (4.58 > 4)', () => {
    const idx = cusumSeries({ ...NIST, h: 4 }, NIST_X).findIndex((p) => p.event?.type === 'open')
    expect(idx + 1).toBe(14)
  })

  it('the incremental step gives the same sums as the batch', () => {
    let s = createCusumState()
    NIST_X.forEach((x, i) => {
      s = stepCusum(NIST, s, x).state
      expect(s.hi).toBe(points[i]!.hi)
      expect(s.lo).toBe(points[i]!.lo)
    })
  })

  it('sums are in data units: scaling σ scales kσ and hσ', () => {
    // Same data shape around 0 with σ = 2 and every deviation doubled gives doubled sums.
    const scaled = cusumSeries({ target: 0, sigma: 2, k: 0.5, h: 5 }, NIST_X.map((x) => 2 * (x - 325)))
    scaled.forEach((p, i) => expect(p.hi).toBeCloseTo(2 * NIST_S_HI[i]!, 9))
  })
})

describe('alert life cycle', () => {
  const p: CusumParams = { target: 50, sigma: 1, k: 0.5, h: 5 }

  it('clears when the open side returns to 0, then restarts both sums from 0', () => {
    // +3σ for 3 samples: S_hi 2.5, 5, 7.5 → opens at the 3rd; then 47: −3.5 per sample → 4, 0.5, 0 → clears.
    const pts = cusumSeries(p, [53, 53, 53, 47, 47, 47, 50])
    expect(pts.map((q) => q.event?.type ?? '-')).toEqual(['-', '-', 'open', '-', '-', 'clear', '-'])
    expect(pts[5]).toMatchObject({ hi: 0, lo: 0, open: null })
    expect(pts[5]!.event).toMatchObject({ side: 'high', value: 47, sum: 0, peak: 53 })
    // Without the reset, S_lo would already be 2.5 + 2.5 = 5 after the 47s; reset means 50 starts from 0.
    expect(pts[6]).toMatchObject({ hi: 0, lo: 0 })
  })

  it('clearFraction clears earlier, below clearFraction·hσ', () => {
    const pts = cusumSeries({ ...p, clearFraction: 0.5 }, [53, 53, 53, 47, 47])
    // S_hi after the first 47: 7.5 − 3.5 = 4 > 2.5; after the second: 0.5 ≤ 2.5 → clear.
    expect(pts.map((q) => q.event?.type ?? '-')).toEqual(['-', '-', 'open', '-', 'clear'])
  })

  it('does not open twice while open', () => {
    const pts = cusumSeries(p, Array.from({ length: 500 }, () => 52))
    expect(pts.filter((q) => q.event).length).toBe(1)
  })

  it('capSigma bounds the sum so the alert clears soon after a long drift ends', () => {
    const drift = Array.from({ length: 600 }, () => 52) // 10 h of +2σ means
    const back = Array.from({ length: 100 }, () => 50)
    const uncapped = cusumSeries(p, [...drift, ...back])
    const capped = cusumSeries({ ...p, capSigma: 10 }, [...drift, ...back])
    expect(uncapped.at(-1)!.open).toBe('high') // 900σ to wear off at 0.5σ per sample
    const clearAt = capped.findIndex((q) => q.event?.type === 'clear')
    expect(clearAt - 600 + 1).toBe(20) // 10σ / 0.5σ per sample
    expect(Math.max(...capped.map((q) => q.hi))).toBe(10)
  })

  it('a swing past the other limit clears this side, and the next value opens the other', () => {
    const pts = cusumSeries({ ...p, capSigma: 10 }, [60, 60, 44, 44])
    // hi: 9.5, 10 (cap) → open high; 44: hi 10 − 6.5 = 3.5 > 0, lo 5.5 > 5 → clear high (hi reset to 0);
    // next 44: lo 11 → 10 (cap) > 5 → open low.
    expect(pts.map((q) => [q.event?.type ?? '-', q.event?.side ?? '-'])).toEqual([
      ['open', 'high'],
      ['-', '-'],
      ['clear', 'high'],
      ['open', 'low'],
    ])
    expect(pts[2]).toMatchObject({ hi: 0, lo: 5.5, open: null })
  })

  it('no data and bad parameters change nothing (same state object)', () => {
    const s: CusumState = { hi: 1, lo: 0, open: null, peak: null }
    for (const x of [null, undefined, Number.NaN, Infinity]) expect(stepCusum(p, s, x).state).toBe(s)
    for (const bad of [{ ...p, sigma: 0 }, { ...p, sigma: -1 }, { ...p, sigma: Number.NaN }, { ...p, target: Number.NaN }]) {
      expect(stepCusum(bad, s, 99).state).toBe(s)
    }
  })

  it('k and h default to 0.5 and 5', () => {
    expect(cusumSeries({ target: 325, sigma: 1 }, NIST_X).map((q) => q.hi)).toEqual(cusumSeries(NIST, NIST_X).map((q) => q.hi))
  })
})

describe('properties', () => {
  const params = fc.record({
    target: fc.double({ min: -100, max: 100, noNaN: true }),
    sigma: fc.double({ min: 0.01, max: 10, noNaN: true }),
    k: fc.double({ min: 0, max: 2, noNaN: true }),
    h: fc.double({ min: 0.5, max: 10, noNaN: true }),
    clearFraction: fc.double({ min: 0, max: 0.9, noNaN: true }),
    capSigma: fc.option(fc.double({ min: 11, max: 50, noNaN: true }), { nil: null }),
  })
  const xs = fc.array(fc.oneof(fc.double({ min: -300, max: 300, noNaN: true }), fc.constant(Number.NaN)), { maxLength: 300 })

  it('sums are never negative (and never above the cap)', () => {
    fc.assert(
      fc.property(params, xs, (pr, data) => {
        for (const q of cusumSeries(pr, data)) {
          expect(q.hi).toBeGreaterThanOrEqual(0)
          expect(q.lo).toBeGreaterThanOrEqual(0)
          if (pr.capSigma !== null) expect(Math.max(q.hi, q.lo)).toBeLessThanOrEqual(pr.capSigma * pr.sigma)
        }
      }),
    )
  })

  it('without reset or cap, S_hi(n) = max(0, max over j of Σ_{i=j..n}(x_i − μ0 − kσ)) (max-of-tail-sums form)', () => {
    // An independent characterisation of the recursion; kept below h so no clear resets the sums.
    fc.assert(
      fc.property(fc.array(fc.double({ min: -3, max: 3, noNaN: true }), { maxLength: 60 }), (data) => {
        const pr = { target: 0, sigma: 1, k: 0.5, h: 1e9 }
        cusumSeries(pr, data).forEach((q, n) => {
          let best = 0
          let tail = 0
          for (let j = n; j >= 0; j--) best = Math.max(best, (tail += data[j]! - 0.5))
          expect(q.hi).toBeCloseTo(best, 9)
        })
      }),
    )
  })

  it('events alternate open / clear', () => {
    fc.assert(
      fc.property(params, xs, (pr, data) => {
        const evs = cusumSeries(pr, data).flatMap((q) => (q.event ? [q.event.type] : []))
        evs.forEach((e, i) => expect(e).toBe(i % 2 === 0 ? 'open' : 'clear'))
      }),
    )
  })
})
