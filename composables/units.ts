// Display units for booth readings. Values are SI everywhere in the data (°C, m/s, Pa, %); this
// turns them into the user's units. Conversions come from the cure engine (exact NIST SP 811 factors).
import { cToF, deltaCToF, deltaFToC, fToC, fpmToMps, inH2OToPa, mpsToFpm, paToInH2O } from '#shared/cure/units'

export type TemperatureUnit = 'C' | 'F'
export type AirflowUnit = 'm/s' | 'ft/min'
export type PressureUnit = 'Pa' | 'inH2O'

export interface UnitPrefs {
  temperature: TemperatureUnit
  airflow: AirflowUnit
  pressure: PressureUnit
}

/** What a number measures. `temperatureDelta` is a difference (dew-point margin): no 32° offset. */
export type Quantity = 'temperature' | 'temperatureDelta' | 'airflow' | 'pressure' | 'humidity'

export const DEFAULT_UNITS: Readonly<UnitPrefs> = Object.freeze({ temperature: 'C', airflow: 'm/s', pressure: 'Pa' })

export const UNIT_CHOICES = {
  temperature: [
    { value: 'C', label: '°C' },
    { value: 'F', label: '°F' },
  ],
  airflow: [
    { value: 'm/s', label: 'm/s' },
    { value: 'ft/min', label: 'ft/min' },
  ],
  pressure: [
    { value: 'Pa', label: 'Pa' },
    { value: 'inH2O', label: 'inH₂O' },
  ],
} as const

/** Missing value placeholder. */
export const NO_VALUE = '—'
const NBSP = '\u00a0'
const MINUS = '\u2212'

/** Keeps only known unit values; anything else falls back to the default. */
export function normaliseUnits(p: Partial<Record<keyof UnitPrefs, unknown>> | null | undefined): UnitPrefs {
  const pick = <K extends keyof UnitPrefs>(k: K): UnitPrefs[K] => {
    const v = p?.[k]
    return UNIT_CHOICES[k].some((c) => c.value === v) ? (v as UnitPrefs[K]) : DEFAULT_UNITS[k]
  }
  return { temperature: pick('temperature'), airflow: pick('airflow'), pressure: pick('pressure') }
}

export function unitSymbol(q: Quantity, u: UnitPrefs = DEFAULT_UNITS): string {
  switch (q) {
    case 'temperature':
    case 'temperatureDelta':
      return u.temperature === 'F' ? '°F' : '°C'
    case 'airflow':
      return u.airflow
    case 'pressure':
      return u.pressure === 'inH2O' ? 'inH₂O' : 'Pa'
    case 'humidity':
      return '%'
  }
}

/** SI value → number in the user's unit (NaN for a missing or invalid value). */
export function toDisplay(q: Quantity, si: number | null | undefined, u: UnitPrefs = DEFAULT_UNITS): number {
  if (typeof si !== 'number' || !Number.isFinite(si)) return Number.NaN
  switch (q) {
    case 'temperature':
      return u.temperature === 'F' ? cToF(si) : si
    case 'temperatureDelta':
      return u.temperature === 'F' ? deltaCToF(si) : si
    case 'airflow':
      return u.airflow === 'ft/min' ? mpsToFpm(si) : si
    case 'pressure':
      return u.pressure === 'inH2O' ? paToInH2O(si) : si
    case 'humidity':
      return si
  }
}

/** A number typed in the user's unit → SI (for forms). */
export function fromDisplay(q: Quantity, v: number, u: UnitPrefs = DEFAULT_UNITS): number {
  if (!Number.isFinite(v)) return Number.NaN
  switch (q) {
    case 'temperature':
      return u.temperature === 'F' ? fToC(v) : v
    case 'temperatureDelta':
      return u.temperature === 'F' ? deltaFToC(v) : v
    case 'airflow':
      return u.airflow === 'ft/min' ? fpmToMps(v) : v
    case 'pressure':
      return u.pressure === 'inH2O' ? inH2OToPa(v) : v
    case 'humidity':
      return v
  }
}

/** Decimals that match each unit's sensor resolution (a display value, not a stored one). */
export function decimalsFor(q: Quantity, displayValue: number, u: UnitPrefs = DEFAULT_UNITS): number {
  switch (q) {
    case 'temperature':
    case 'temperatureDelta':
      return 1
    case 'airflow':
      return u.airflow === 'ft/min' ? 0 : 2
    case 'pressure':
      return u.pressure === 'inH2O' ? 3 : Math.abs(displayValue) < 100 ? 1 : 0
    case 'humidity':
      return 0
  }
}

/** A plain number with a true minus sign and no "−0". */
export function formatNumber(v: number, decimals: number): string {
  if (!Number.isFinite(v)) return NO_VALUE
  const s = v.toFixed(decimals)
  if (Number(s) === 0) return s.replace('-', '')
  return s.startsWith('-') ? MINUS + s.slice(1) : s
}

export interface FormatOptions {
  /** Leave the unit symbol off (when a column heading carries it). */
  unit?: boolean
  decimals?: number
  /** Show "+" before positive numbers (margins). */
  signed?: boolean
}

/** SI value → "21.4 °C" in the user's units; "—" when missing. */
export function formatQuantity(q: Quantity, si: number | null | undefined, u: UnitPrefs = DEFAULT_UNITS, o: FormatOptions = {}): string {
  const v = toDisplay(q, si, u)
  if (!Number.isFinite(v)) return NO_VALUE
  let s = formatNumber(v, o.decimals ?? decimalsFor(q, v, u))
  if (o.signed && !s.startsWith(MINUS) && Number(s) !== 0) s = '+' + s
  return o.unit === false ? s : s + NBSP + unitSymbol(q, u)
}
