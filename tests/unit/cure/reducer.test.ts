import { describe, expect, it } from 'vitest'
import type { ReducerBand } from '#shared/cure'
import { reducerAdvice, reducerCheck } from '#shared/cure'

// Source: an invented TDS reducer table (below 18 °C fast, 18–25 °C medium, 25–32 °C slow, above 32 °C extra slow).
// The edge rule is ours and documented: bands are [minC, maxC), a shared edge belongs to the warmer band.
const bands: ReducerBand[] = [
  { minC: 25, maxC: 32, grade: 'slow' },
  { minC: Number.NEGATIVE_INFINITY, maxC: 18, grade: 'fast' },
  { minC: 18, maxC: 25, grade: 'medium' },
  { minC: 32, maxC: Number.POSITIVE_INFINITY, grade: 'extra slow' },
]

describe('reducer advice', () => {
  it('maps temperatures to bands, edges to the warmer band', () => {
    expect(reducerAdvice(bands, 5)).toBe('fast')
    expect(reducerAdvice(bands, 17.99)).toBe('fast')
    expect(reducerAdvice(bands, 18)).toBe('medium')
    expect(reducerAdvice(bands, 25)).toBe('slow')
    expect(reducerAdvice(bands, 40)).toBe('extra slow')
  })

  it('gives no advice outside bounded bands, for overlaps, or for garbage', () => {
    const bounded = bands.slice(0, 1)
    expect(reducerAdvice(bounded, 32)).toBeNull() // the upper edge is exclusive
    expect(reducerAdvice([...bands, { minC: 20, maxC: 22, grade: 'x' }], 21)).toBeNull()
    expect(reducerAdvice([{ minC: 20, maxC: 10, grade: 'x' }], 15)).toBeNull()
    expect(reducerAdvice(bands, Number.NaN)).toBeNull()
    expect(reducerAdvice([], 20)).toBeNull()
  })

  it('checks the logged grade', () => {
    expect(reducerCheck(bands, 28, ' Slow ')).toMatchObject({ ok: true, status: 'match', advised: 'slow', used: 'Slow' })
    const wrong = reducerCheck(bands, 28, 'fast')
    expect(wrong).toMatchObject({ ok: false, status: 'mismatch', advised: 'slow', used: 'fast' })
    expect(wrong.message).toContain('slow')
    expect(reducerCheck(bands, 28, null)).toMatchObject({ ok: false, status: 'no-grade-logged' })
    expect(reducerCheck(bands, Number.NaN, 'slow')).toMatchObject({ ok: false, status: 'no-advice', advised: null })
  })
})
