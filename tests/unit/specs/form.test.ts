import { describe, expect, it } from 'vitest'
import { checkForm, emptyFormState, formPayload, formStateFromRevision, switchFormUnit } from '#shared/specs/form'
import { fields } from './fixtures'

const solvent2K = { chemistry: 'solvent', components: 2 } as const
const waterborne1K = { chemistry: 'waterborne', components: 1 } as const

describe('revision form state', () => {
  it('shows a stored revision in °F and saves it back to the same °C values', () => {
    const rev = fields({ potLifeMinutes: 60, mixRatio: '4:1', reducerBands: [{ fromC: null, toC: 18, grade: 'Fast' }, { fromC: 18, toC: null, grade: 'Slow' }], minAirTempC: 15 })
    const s = formStateFromRevision(rev, 'F')
    expect(s.refTempC).toBe(68)
    expect(s.reducerBands[0]!.toC).toBe(64.4)
    expect(s.minAirTempC).toBe(59)
    const check = checkForm(s, 'F', solvent2K)
    expect(check.ok).toBe(true)
    expect(check.fields!.refTempC).toBeCloseTo(20, 9)
    expect(check.fields!.reducerBands[1]!.fromC).toBeCloseTo(18, 9)
    expect(check.fields!.minAirTempC).toBeCloseTo(15, 9)
  })

  it('switches units both ways without drift beyond the display rounding', () => {
    const s = formStateFromRevision(fields({ minAirTempC: 17.3 }), 'C')
    const back = switchFormUnit(switchFormUnit(s, 'C', 'F'), 'F', 'C')
    expect(back.minAirTempC!).toBeCloseTo(17.3, 1)
    expect(back.flashMinMinutes).toBe(s.flashMinMinutes)
  })

  it('reports schema and product rules by field path', () => {
    const s = { ...emptyFormState(solvent2K), flashMinMinutes: 5, flashMaxMinutes: 10, flashBeforeNextMinutes: 15 }
    const check = checkForm(s, 'C', solvent2K)
    expect(check.ok).toBe(false)
    expect(Object.keys(check.errors).sort()).toEqual(['mixRatio', 'potLifeMinutes'])
    const missing = checkForm(emptyFormState(solvent2K), 'C', solvent2K)
    expect(missing.errors.flashMinMinutes).toBe('Enter the shortest flash between coats')
  })

  it('sends the waterborne references only for waterborne products, and no table for them', () => {
    const wb = { ...emptyFormState(waterborne1K), flashMinMinutes: 4, flashMaxMinutes: 8, flashBeforeNextMinutes: 15, flashTable: [{ tempC: 10, minutes: 9 }, { tempC: 20, minutes: 5 }] }
    const body = formPayload(wb, 'C', waterborne1K)
    expect(body).toMatchObject({ unit: 'C', wbRefRhPct: 50, wbRefAirflowMps: 0.3, wbAirflowExponent: 0.5, flashTable: null, mixRatio: null })
    expect(checkForm(wb, 'C', waterborne1K).ok).toBe(true)
    expect(formPayload({ ...wb, wbRefRhPct: 60 }, 'C', solvent2K)).toMatchObject({ wbRefRhPct: null, flashTable: wb.flashTable })
  })
})
