// Q10 temperature scaling: a rate multiplies by Q10 for every 10 °C rise.
//   r = Q10^((T − Tref)/10)
// Source: the Q10 temperature coefficient (van 't Hoff's rule of thumb); Q10 = 2, "twice as fast per 10 °C", is
// common practice for solvent evaporation and pot life when a data sheet gives no better figure.

import { isFiniteNumber } from './guards'

export const DEFAULT_Q10 = 2
export const DEFAULT_REF_TEMP_C = 20
/** Booth-air range over which we apply Q10 (same as the psychrometric range). */
export const Q10_MIN_C = -40
export const Q10_MAX_C = 60

/** Q10 multiplier (dimensionless). tC, refTempC in −40…60 °C; q10 ≥ 1 (warmer never slower); else NaN. */
export function q10Factor(tC: number, refTempC: number, q10: number = DEFAULT_Q10): number {
  if (!isFiniteNumber(tC) || !isFiniteNumber(refTempC) || !isFiniteNumber(q10) || q10 < 1) return Number.NaN
  if (tC < Q10_MIN_C || tC > Q10_MAX_C || refTempC < Q10_MIN_C || refTempC > Q10_MAX_C) return Number.NaN
  return Math.pow(q10, (tC - refTempC) / 10)
}
