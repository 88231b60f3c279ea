import { beforeEach, describe, expect, it } from 'vitest'
import { DEFAULT_UNITS, formatQuantity, fromDisplay, normaliseUnits, toDisplay } from '~/composables/units'
import { useSessionStore } from '~/stores/session'
import { user } from './fixtures'

const NB = '\u00a0'

describe('session store unit formatter', () => {
  beforeEach(() => {
    const session = useSessionStore()
    session.setUser(user())
    session.setUnits({ ...DEFAULT_UNITS })
  })

  it('defaults to °C, m/s and Pa', () => {
    const s = useSessionStore()
    expect(s.units).toEqual({ temperature: 'C', airflow: 'm/s', pressure: 'Pa' })
    expect(s.format('temperature', 21.44)).toBe(`21.4${NB}°C`)
    expect(s.format('airflow', 0.406)).toBe(`0.41${NB}m/s`)
    expect(s.format('pressure', 6.54)).toBe(`6.5${NB}Pa`)
    expect(s.format('pressure', 140.4)).toBe(`140${NB}Pa`)
    expect(s.format('humidity', 54.4)).toBe(`54${NB}%`)
  })

  it('converts to °F, ft/min and inH₂O when chosen', () => {
    const s = useSessionStore()
    s.setUnits({ temperature: 'F', airflow: 'ft/min', pressure: 'inH2O' })
    expect(s.format('temperature', 20)).toBe(`68.0${NB}°F`)
    expect(s.format('temperature', -10)).toBe(`14.0${NB}°F`)
    expect(s.format('temperatureDelta', 3)).toBe(`5.4${NB}°F`)
    expect(s.format('airflow', 0.508)).toBe(`100${NB}ft/min`)
    expect(s.format('pressure', 249.08891)).toBe(`1.000${NB}inH₂O`)
    expect(s.symbol('pressure')).toBe('inH₂O')
    expect(s.convert('temperature', 100)).toBeCloseTo(212, 10)
  })

  it('writes missing values as a dash and negatives with a minus sign', () => {
    const s = useSessionStore()
    expect(s.format('temperature', null)).toBe('—')
    expect(s.format('temperature', undefined)).toBe('—')
    expect(s.format('temperature', Number.NaN)).toBe('—')
    expect(s.format('temperature', -2.25)).toBe(`\u22122.3${NB}°C`)
    expect(s.format('temperature', -0.01)).toBe(`0.0${NB}°C`)
    expect(s.format('temperatureDelta', 2.5, { signed: true })).toBe(`+2.5${NB}°C`)
    expect(s.format('temperature', 21.4, { unit: false })).toBe('21.4')
  })

  it("uses the account's stored preferences, and a choice made on this device over them", () => {
    const s = useSessionStore()
    s.setUser(user({ prefs: { temperature: 'F', pressure: 'inH2O' } }))
    // The device choice set in beforeEach (°C) wins over the account's °F…
    expect(s.units.temperature).toBe('C')
    // …and a fresh device (no cookie) follows the account.
    s.clearDeviceUnits()
    expect(s.units).toEqual({ temperature: 'F', airflow: 'm/s', pressure: 'inH2O' })
  })

  it('ignores unit values it does not know', () => {
    expect(normaliseUnits({ temperature: 'K', airflow: 'knots', pressure: 'inH2O' })).toEqual({ temperature: 'C', airflow: 'm/s', pressure: 'inH2O' })
    expect(normaliseUnits(null)).toEqual(DEFAULT_UNITS)
  })

  it('converts back from display units to SI', () => {
    const u = { temperature: 'F', airflow: 'ft/min', pressure: 'inH2O' } as const
    expect(fromDisplay('temperature', toDisplay('temperature', 23.5, u), u)).toBeCloseTo(23.5, 10)
    expect(fromDisplay('airflow', 100, u)).toBeCloseTo(0.508, 10)
    expect(fromDisplay('temperatureDelta', 9, u)).toBeCloseTo(5, 10)
    expect(formatQuantity('pressure', 6.5, u)).toBe(`0.026${NB}inH₂O`)
  })
})
