// Moist-air basics for the booth: saturation vapour pressure, dew point, VPD, dew-point margin.
// Magnus form over liquid water with the Alduchov & Eskridge (1996) constants:
//   e_s(T) = c · exp(a·T / (b + T)),  a = 17.625, b = 243.04 °C, c = 610.94 Pa
// Source: O. A. Alduchov, R. E. Eskridge, "Improved Magnus form approximation of saturation vapor pressure",
// J. Appl. Meteor. 35 (1996) 601–609 (their fit range −40…50 °C). We accept −40…60 °C: against the ASHRAE
// (Hyland–Wexler) values the error stays within about 0.4 % up to 60 °C. Below 0 °C this is over supercooled
// water, not ice (a dew point, not a frost point), which is what a condensation check wants.

import { isFiniteNumber } from './guards'

export const MAGNUS_A = 17.625
export const MAGNUS_B_C = 243.04
export const MAGNUS_C_PA = 610.94
export const PSYCHRO_MIN_C = -40
export const PSYCHRO_MAX_C = 60

function inRangeC(tC: unknown): tC is number {
  return isFiniteNumber(tC) && tC >= PSYCHRO_MIN_C && tC <= PSYCHRO_MAX_C
}

/** Saturation vapour pressure over water, Pa. tC in −40…60 °C, else NaN. Magnus / Alduchov & Eskridge 1996. */
export function saturationVapourPressurePa(tC: number): number {
  if (!inRangeC(tC)) return Number.NaN
  return MAGNUS_C_PA * Math.exp((MAGNUS_A * tC) / (MAGNUS_B_C + tC))
}

/**
 * Dew point, °C, from air temperature tC (−40…60 °C) and relative humidity rhPct (0 < rh ≤ 100 %), else NaN.
 * Inverse of the Magnus form: γ = ln(rh/100) + a·T/(b + T), Td = b·γ / (a − γ) (Alduchov & Eskridge 1996).
 */
export function dewPointC(tC: number, rhPct: number): number {
  if (!inRangeC(tC) || !isFiniteNumber(rhPct) || !(rhPct > 0 && rhPct <= 100)) return Number.NaN
  const gamma = Math.log(rhPct / 100) + (MAGNUS_A * tC) / (MAGNUS_B_C + tC)
  return (MAGNUS_B_C * gamma) / (MAGNUS_A - gamma)
}

/**
 * Vapour-pressure deficit, Pa: e_s(T) · (1 − rh/100). tC in −40…60 °C, rhPct in 0…100 %, else NaN.
 * Definition (e.g. Monteith & Unsworth, Principles of Environmental Physics) on the Magnus e_s above.
 */
export function vapourPressureDeficitPa(tC: number, rhPct: number): number {
  if (!isFiniteNumber(rhPct) || !(rhPct >= 0 && rhPct <= 100)) return Number.NaN
  return saturationVapourPressurePa(tC) * (1 - rhPct / 100)
}

/**
 * Dew-point margin, K (°C difference): surface temperature − dew point. Any finite inputs (a baking panel may be
 * far above 60 °C); NaN otherwise. Positive = surface above the dew point.
 */
export function dewPointMarginC(surfaceTempC: number, dewPointTempC: number): number {
  if (!isFiniteNumber(surfaceTempC) || !isFiniteNumber(dewPointTempC)) return Number.NaN
  return surfaceTempC - dewPointTempC
}
