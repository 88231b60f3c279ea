import { describe, expect, it } from 'vitest'
import { mixWarnings } from '../../../server/domain/mixes'
import { CLEAR, PRIMER, revision, WET_BED } from './fixtures'

describe('mix warnings', () => {
  it('advise the data sheet band for the booth temperature and warn on another grade', () => {
    // Demo clearcoat bands: < 18 °C Fast, 18–27 °C Standard, ≥ 27 °C Slow.
    expect(mixWarnings(CLEAR, 21, 'Standard')).toEqual({ advised: 'Standard', warnings: [] })
    const w = mixWarnings(CLEAR, 29.5, 'standard ')
    expect(w.advised).toBe('Slow')
    expect(w.warnings).toEqual([expect.stringMatching(/Reducer standard logged; the data sheet advises Slow at this temperature\. \(booth 29\.5 °C\)/)])
  })

  it('say when no reducer was logged or the temperature is unknown', () => {
    expect(mixWarnings(PRIMER, 16, null).warnings).toEqual([expect.stringMatching(/No reducer logged; the data sheet advises Fast/)])
    expect(mixWarnings(PRIMER, null, 'Fast')).toEqual({ advised: null, warnings: [expect.stringMatching(/No current booth air temperature/)] })
  })

  it('stay quiet for a product without reducer bands, and flag a 2K product without pot life', () => {
    expect(mixWarnings(WET_BED, 21, null)).toEqual({ advised: null, warnings: [] })
    const noPotLife = { ...revision(9, '2K high-solids clearcoat'), fields: { ...CLEAR.fields, potLifeMinutes: null } }
    expect(mixWarnings(noPotLife, 21, 'Standard').warnings).toEqual([expect.stringMatching(/no pot life/)])
  })
})
