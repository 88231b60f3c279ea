// Display-unit conversions. Factors are the exact definitions of NIST SP 811 (2008), Appendix B:
//   t/°F = 1.8 · t/°C + 32; a temperature difference of 1 °C = 1.8 °F
//   1 ft = 0.3048 m exactly → 1 ft/min = 0.00508 m/s exactly
//   1 inH2O (conventional) = 249.08891 Pa = 1000 kg/m³ · 9.80665 m/s² · 0.0254 m exactly
//   1 psi = 1 lbf/in² = 0.45359237 kg · 9.80665 m/s² / (0.0254 m)² = 6894.757293168… Pa (the table rounds to 6.894757 kPa)
// Non-finite input → NaN; temperatures below absolute zero → NaN.

import { isFiniteNumber } from './guards'

export const F_PER_C = 1.8
export const F_OFFSET = 32
export const ABSOLUTE_ZERO_C = -273.15
export const ABSOLUTE_ZERO_F = -459.67
export const MPS_PER_FPM = 0.00508
export const PA_PER_INH2O = 249.08891
export const PA_PER_PSI = (0.45359237 * 9.80665) / (0.0254 * 0.0254)

/** °C → °F (exact, NIST SP 811 App. B). Valid ≥ −273.15 °C. */
export function cToF(c: number): number {
  return isFiniteNumber(c) && c >= ABSOLUTE_ZERO_C ? c * F_PER_C + F_OFFSET : Number.NaN
}

/** °F → °C (exact, NIST SP 811 App. B). Valid ≥ −459.67 °F. */
export function fToC(f: number): number {
  return isFiniteNumber(f) && f >= ABSOLUTE_ZERO_F ? (f - F_OFFSET) / F_PER_C : Number.NaN
}

/** Temperature difference °C (= K) → °F (= °R): × 1.8, no offset (NIST SP 811 App. B). Any finite value. */
export function deltaCToF(dc: number): number {
  return isFiniteNumber(dc) ? dc * F_PER_C : Number.NaN
}

/** Temperature difference °F → °C: ÷ 1.8, no offset (NIST SP 811 App. B). Any finite value. */
export function deltaFToC(df: number): number {
  return isFiniteNumber(df) ? df / F_PER_C : Number.NaN
}

/** m/s → ft/min (1 ft/min = 0.00508 m/s exactly, NIST SP 811 App. B). Any finite value. */
export function mpsToFpm(mps: number): number {
  return isFiniteNumber(mps) ? mps / MPS_PER_FPM : Number.NaN
}

/** ft/min → m/s (NIST SP 811 App. B). Any finite value. */
export function fpmToMps(fpm: number): number {
  return isFiniteNumber(fpm) ? fpm * MPS_PER_FPM : Number.NaN
}

/** Pa → inH2O, conventional inch of water 249.08891 Pa (NIST SP 811 App. B). Any finite value (gauge may be negative). */
export function paToInH2O(pa: number): number {
  return isFiniteNumber(pa) ? pa / PA_PER_INH2O : Number.NaN
}

/** inH2O (conventional) → Pa (NIST SP 811 App. B). Any finite value. */
export function inH2OToPa(inH2O: number): number {
  return isFiniteNumber(inH2O) ? inH2O * PA_PER_INH2O : Number.NaN
}

/** kPa → psi (1 psi = 6.894757… kPa, NIST SP 811 App. B). Any finite value. */
export function kPaToPsi(kPa: number): number {
  return isFiniteNumber(kPa) ? (kPa * 1000) / PA_PER_PSI : Number.NaN
}

/** psi → kPa (NIST SP 811 App. B). Any finite value. */
export function psiToKPa(psi: number): number {
  return isFiniteNumber(psi) ? (psi * PA_PER_PSI) / 1000 : Number.NaN
}
