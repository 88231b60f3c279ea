// Application window of a product (TDS temperature / humidity limits) and the condensation guard.
// Condensation guard: the surface should stay at least 3 °C (≈ 5 °F) above the dew point — common coatings
// practice, not a figure from a standard we cite here. Dew point: Magnus / Alduchov & Eskridge (psychrometrics.ts).

import { isFiniteNumber, isRecord } from './guards'
import { dewPointC, dewPointMarginC } from './psychrometrics'

export interface ApplicationLimits {
  /** °C, inclusive; checked on air and, when read, panel temperature. */
  minTempC?: number
  maxTempC?: number
  /** %, inclusive. */
  minRhPct?: number
  maxRhPct?: number
}

export interface ApplicationReading {
  airTempC?: number | null
  panelTempC?: number | null
  rhPct?: number | null
}

export type ApplicationChannel = 'airTempC' | 'panelTempC' | 'rhPct'

export interface ApplicationProblem {
  channel: ApplicationChannel
  /** The reading; null when a limited channel had no usable reading. */
  value: number | null
  limit: number
  kind: 'below' | 'above' | 'missing'
}

export interface ApplicationCheck {
  /** Limits well-formed and no problems. */
  ok: boolean
  /** False when a limit is not a finite number or min > max; problems is then empty. */
  limitsValid: boolean
  problems: ApplicationProblem[]
}

function limitOf(x: unknown): number | null | undefined {
  if (x === undefined) return undefined
  return isFiniteNumber(x) ? x : null // null = malformed
}

/**
 * Checks a reading against the TDS limits (bounds inclusive). A limited channel without a reading is a
 * 'missing' problem (air temperature is required when a temperature limit is set; panel is checked only when read).
 */
export function applicationWindowCheck(limits: ApplicationLimits, reading: ApplicationReading): ApplicationCheck {
  const bad: ApplicationCheck = { ok: false, limitsValid: false, problems: [] }
  if (!isRecord(limits)) return bad
  const minT = limitOf(limits.minTempC)
  const maxT = limitOf(limits.maxTempC)
  const minRh = limitOf(limits.minRhPct)
  const maxRh = limitOf(limits.maxRhPct)
  if (minT === null || maxT === null || minRh === null || maxRh === null) return bad
  if (minT !== undefined && maxT !== undefined && minT > maxT) return bad
  if (minRh !== undefined && maxRh !== undefined && minRh > maxRh) return bad

  const r: Record<string, unknown> = isRecord(reading) ? reading : {}
  const problems: ApplicationProblem[] = []
  const check = (channel: ApplicationChannel, min: number | undefined, max: number | undefined, required: boolean) => {
    if (min === undefined && max === undefined) return
    const v = r[channel]
    if (!isFiniteNumber(v)) {
      if (required) problems.push({ channel, value: null, limit: (min ?? max) as number, kind: 'missing' })
      return
    }
    if (min !== undefined && v < min) problems.push({ channel, value: v, limit: min, kind: 'below' })
    if (max !== undefined && v > max) problems.push({ channel, value: v, limit: max, kind: 'above' })
  }
  check('airTempC', minT, maxT, true)
  check('panelTempC', minT, maxT, false)
  check('rhPct', minRh, maxRh, true)
  return { ok: problems.length === 0, limitsValid: true, problems }
}

export interface CondensationCheck {
  /** marginC ≥ minMarginC; false when anything is unknown. */
  ok: boolean
  /** Surface − dew point, K; NaN when not computable. */
  marginC: number
  dewPointC: number
}

/**
 * Condensation guard: surface temperature must be ≥ dew point + minMarginC (default 3 °C, common practice).
 * airTempC −40…60 °C, rhPct 0 < rh ≤ 100, surface finite, minMarginC finite ≥ 0; else NaN fields and ok false.
 */
export function condensationGuard(
  surfaceTempC: number,
  airTempC: number,
  rhPct: number,
  minMarginC: number = 3,
): CondensationCheck {
  const dp = dewPointC(airTempC, rhPct)
  const margin = dewPointMarginC(surfaceTempC, dp)
  const marginOk = isFiniteNumber(minMarginC) && minMarginC >= 0
  return { ok: marginOk && margin >= minMarginC, marginC: margin, dewPointC: dp }
}
