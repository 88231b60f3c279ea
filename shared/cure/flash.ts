// Flash-off progress of a coat: p = ∫ r dt / F over the readings since the coat finished, ready when p ≥ 1.
//   Solvent-borne: r = Q10^((T_air − Tref)/10), or r = m(Tref)/m(T_air) from a multi-point TDS table m(T)
//   Waterborne:    r = (VPD/VPD_ref) · (v/v_ref)^n, VPD_ref = e_s(Tref)·(1 − RH_ref/100)
// Water evaporation is driven by the vapour-pressure difference and by the mass-transfer coefficient; for laminar
// flow over a flat plate Sh ∝ Re^0.5 (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, external-flow
// chapter; quoted from memory), hence n = 0.5 by default.

import { isFiniteNumber, isRecord, optionalNumber } from './guards'
import { saturationVapourPressurePa, vapourPressureDeficitPa } from './psychrometrics'
import { DEFAULT_Q10, DEFAULT_REF_TEMP_C, Q10_MAX_C, Q10_MIN_C, q10Factor } from './q10'
import type { EstimateReason } from './reasons'
import type { HeldValues, HoldOptions, Sample } from './samples'
import { holdOptionsOf, integrateRate, projectCrossing } from './samples'

export type FlashChemistry = 'solvent' | 'waterborne'

/** One row of a TDS flash table: flash time (minutes) at an air temperature (°C). */
export interface FlashTablePoint {
  tempC: number
  minutes: number
}

export interface FlashSpec {
  chemistry: FlashChemistry
  /** Shortest flash time at refTempC (and refRhPct / refAirflowMps for waterborne), minutes, > 0. */
  flashMinMinutes: number
  /** Longest flash time of the TDS range, minutes, ≥ flashMinMinutes. */
  flashMaxMinutes: number
  /** Reference temperature of the flash times, °C. Default 20. */
  refTempC?: number
  /** Solvent-borne Q10, ≥ 1. Default 2 (common practice). */
  q10?: number
  /** Solvent-borne multi-point table (≥ 2 distinct temperatures, minutes > 0 and not rising with temperature). */
  table?: readonly FlashTablePoint[]
  /** Waterborne reference RH, %, 0 ≤ rh < 100. Default 50. */
  refRhPct?: number
  /** Waterborne reference air velocity, m/s, > 0. Default 0.3 (a typical downdraft cabin speed). */
  refAirflowMps?: number
  /** Waterborne airflow exponent n, 0…1. Default 0.5 (laminar flat plate, Sh ∝ Re^0.5). */
  airflowExponent?: number
  /**
   * Waterborne: readings below this air velocity count as this velocity, m/s, ≥ 0. Default 0.1. Our own working
   * assumption: still air still evaporates by natural convection, so a stalled anemometer must not stop the clock.
   */
  minAirflowMps?: number
  /** End of the recoat window, in equivalent minutes since the coat, ≥ flashMinMinutes. Default flashMaxMinutes. */
  recoatWindowMinutes?: number
}

export interface FlashResult {
  /** ∫ r dt / flashMinMinutes (dimensionless); ≥ 1 means ready. NaN on invalid input. */
  progress: number
  ready: boolean
  /** Earliest ready time (flashMin reached): the exact crossing if ready, else projected at the current rate. */
  readyAtMs: number | null
  /** Latest end of the TDS range (flashMax reached), same rules: together with readyAtMs the min…max estimate. */
  readyByMs: number | null
  /** When the recoat window closes (recoatWindowMinutes, else flashMaxMinutes), same rules. */
  recoatWindowEndsAtMs: number | null
  recoatWindowPassed: boolean
  /** Current drying-rate multiplier (1 = reference conditions); NaN if no usable reading now. */
  rateNow: number
  /** Airflow was missing somewhere and the reference velocity was assumed. */
  airflowAssumed: boolean
  uncertain: boolean
  reasons: EstimateReason[]
}

export const DEFAULT_REF_RH_PCT = 50
export const DEFAULT_REF_AIRFLOW_MPS = 0.3
export const DEFAULT_AIRFLOW_EXPONENT = 0.5
export const DEFAULT_MIN_AIRFLOW_MPS = 0.1

/**
 * Flash minutes at tC from a TDS table: log-linear interpolation (ln minutes linear in °C) between neighbours,
 * clamped to the end rows outside the table. Table as FlashSpec.table; tC finite; else NaN.
 */
export function flashTableMinutes(table: readonly FlashTablePoint[], tC: number): number {
  const rows = validTable(table)
  if (rows === null || !isFiniteNumber(tC)) return Number.NaN
  const first = rows[0] as FlashTablePoint
  const last = rows[rows.length - 1] as FlashTablePoint
  if (tC <= first.tempC) return first.minutes
  if (tC >= last.tempC) return last.minutes
  for (let i = 1; i < rows.length; i++) {
    const hi = rows[i] as FlashTablePoint
    if (tC <= hi.tempC) {
      const lo = rows[i - 1] as FlashTablePoint
      const f = (tC - lo.tempC) / (hi.tempC - lo.tempC)
      return Math.exp(Math.log(lo.minutes) + f * (Math.log(hi.minutes) - Math.log(lo.minutes)))
    }
  }
  return last.minutes
}

/** Sorted copy of a usable table, or null. */
function validTable(table: unknown): FlashTablePoint[] | null {
  if (!Array.isArray(table) || table.length < 2) return null
  const rows: FlashTablePoint[] = []
  for (const r of table as unknown[]) {
    if (!isRecord(r) || !isFiniteNumber(r.tempC) || !isFiniteNumber(r.minutes) || !(r.minutes > 0)) return null
    rows.push({ tempC: r.tempC, minutes: r.minutes })
  }
  rows.sort((a, b) => a.tempC - b.tempC)
  for (let i = 1; i < rows.length; i++) {
    const a = rows[i - 1] as FlashTablePoint
    const b = rows[i] as FlashTablePoint
    // Equal temperatures are ambiguous; a warmer row that is slower is taken as a typo in the data sheet.
    if (b.tempC === a.tempC || b.minutes > a.minutes) return null
  }
  return rows
}

/** Solvent-borne rate multiplier from a table: m(Tref)/m(T). tC, refTempC in −40…60 °C; else NaN. */
export function tableFlashRate(table: readonly FlashTablePoint[], tC: number, refTempC: number): number {
  if (!isFiniteNumber(tC) || tC < Q10_MIN_C || tC > Q10_MAX_C) return Number.NaN
  if (!isFiniteNumber(refTempC) || refTempC < Q10_MIN_C || refTempC > Q10_MAX_C) return Number.NaN
  return flashTableMinutes(table, refTempC) / flashTableMinutes(table, tC)
}

export interface WaterborneReference {
  refTempC: number
  refRhPct: number
  refAirflowMps: number
  airflowExponent: number
  minAirflowMps: number
}

/**
 * Waterborne rate multiplier r = (VPD/VPD_ref)·(max(v, v_min)/v_ref)^n (dimensionless).
 * tC in −40…60 °C, rhPct 0…100 %, airflowMps ≥ 0 (v_min applied), reference as in FlashSpec; else NaN.
 */
export function waterborneFlashRate(tC: number, rhPct: number, airflowMps: number, ref: WaterborneReference): number {
  if (!isRecord(ref) || !isFiniteNumber(airflowMps) || airflowMps < 0) return Number.NaN
  const { refTempC, refRhPct, refAirflowMps, airflowExponent, minAirflowMps } = ref
  if (!isFiniteNumber(refAirflowMps) || !(refAirflowMps > 0)) return Number.NaN
  if (!isFiniteNumber(airflowExponent) || airflowExponent < 0 || airflowExponent > 1) return Number.NaN
  if (!isFiniteNumber(minAirflowMps) || minAirflowMps < 0) return Number.NaN
  if (!isFiniteNumber(refRhPct) || refRhPct >= 100) return Number.NaN
  const vpdRef = vapourPressureDeficitPa(refTempC, refRhPct)
  const vpd = vapourPressureDeficitPa(tC, rhPct)
  if (!(vpdRef > 0) || !Number.isFinite(vpd)) return Number.NaN
  const v = Math.max(airflowMps, minAirflowMps)
  return (vpd / vpdRef) * Math.pow(v / refAirflowMps, airflowExponent)
}

interface ResolvedFlashSpec {
  chemistry: FlashChemistry
  flashMin: number
  flashMax: number
  recoat: number
  refTempC: number
  q10: number
  table: FlashTablePoint[] | null
  tableIgnored: boolean
  ref: WaterborneReference
}

function resolveSpec(spec: unknown): ResolvedFlashSpec | null {
  if (!isRecord(spec)) return null
  const chemistry = spec.chemistry
  if (chemistry !== 'solvent' && chemistry !== 'waterborne') return null
  const flashMin = spec.flashMinMinutes
  const flashMax = spec.flashMaxMinutes
  if (!isFiniteNumber(flashMin) || !(flashMin > 0) || !isFiniteNumber(flashMax) || flashMax < flashMin) return null
  const recoat = optionalNumber(spec.recoatWindowMinutes, flashMax, (v) => v >= flashMin)
  const refTempC = optionalNumber(spec.refTempC, DEFAULT_REF_TEMP_C, (v) => v >= Q10_MIN_C && v <= Q10_MAX_C)
  const q10 = optionalNumber(spec.q10, DEFAULT_Q10, (v) => v >= 1)
  const ref: WaterborneReference = {
    refTempC,
    refRhPct: optionalNumber(spec.refRhPct, DEFAULT_REF_RH_PCT, (v) => v >= 0 && v < 100),
    refAirflowMps: optionalNumber(spec.refAirflowMps, DEFAULT_REF_AIRFLOW_MPS, (v) => v > 0),
    airflowExponent: optionalNumber(spec.airflowExponent, DEFAULT_AIRFLOW_EXPONENT, (v) => v >= 0 && v <= 1),
    minAirflowMps: optionalNumber(spec.minAirflowMps, DEFAULT_MIN_AIRFLOW_MPS, (v) => v >= 0),
  }
  const numbers = [recoat, refTempC, q10, ref.refRhPct, ref.refAirflowMps, ref.airflowExponent, ref.minAirflowMps]
  if (numbers.some((n) => Number.isNaN(n))) return null
  let table: FlashTablePoint[] | null = null
  const hasTable = spec.table !== undefined && spec.table !== null
  if (hasTable) {
    table = validTable(spec.table)
    if (table === null) return null
  }
  const tableIgnored = hasTable && chemistry === 'waterborne'
  return { chemistry, flashMin, flashMax, recoat, refTempC, q10, table: tableIgnored ? null : table, tableIgnored, ref }
}

function invalidFlash(): FlashResult {
  return {
    progress: Number.NaN,
    ready: false,
    readyAtMs: null,
    readyByMs: null,
    recoatWindowEndsAtMs: null,
    recoatWindowPassed: false,
    rateNow: Number.NaN,
    airflowAssumed: false,
    uncertain: true,
    reasons: ['invalid-input'],
  }
}

/**
 * Flash-off progress of a coat finished at coatEndedAtMs, evaluated at nowMs (epoch ms, now ≥ coat end).
 * Solvent-borne uses air temperature; waterborne uses air temperature, RH and airflow (missing airflow → the
 * reference velocity, flagged). Readings are zero-order held for options.maxHoldMs (default 2 min); beyond that
 * nothing accrues and the result is uncertain. Invalid input → NaN progress, null times. Never throws.
 */
export function flashProgress(
  spec: FlashSpec,
  samples: readonly Sample[],
  coatEndedAtMs: number,
  nowMs: number,
  options?: HoldOptions,
): FlashResult {
  const s = resolveSpec(spec)
  const hold = holdOptionsOf(options)
  if (s === null || hold === null) return invalidFlash()
  let airflowAssumed = false
  const rate = (v: HeldValues): number => {
    if (v.airTempC === null) return Number.NaN
    if (s.chemistry === 'solvent') {
      return s.table ? tableFlashRate(s.table, v.airTempC, s.refTempC) : q10Factor(v.airTempC, s.refTempC, s.q10)
    }
    if (v.rhPct === null) return Number.NaN
    const airflow = v.airflowMps
    // A negative speed is a sensor fault: treated like a missing reading.
    if (airflow === null || airflow < 0) {
      const r = waterborneFlashRate(v.airTempC, v.rhPct, s.ref.refAirflowMps, s.ref)
      if (Number.isFinite(r)) airflowAssumed = true
      return r
    }
    return waterborneFlashRate(v.airTempC, v.rhPct, airflow, s.ref)
  }
  const targets = [s.flashMin, s.flashMax, s.recoat]
  const run = integrateRate(samples, coatEndedAtMs, nowMs, rate, { ...hold, targets })
  if (!run.valid) return invalidFlash()
  const [atMin = null, atMax = null, atRecoat = null] = run.crossings
  const reasons: EstimateReason[] = []
  if (run.uncoveredMs > 0) reasons.push('data-gap')
  if (Number.isNaN(run.rateNow)) reasons.push('no-current-reading')
  else if (run.rateNow === 0) reasons.push('no-progress-now')
  if (airflowAssumed) reasons.push('airflow-assumed')
  if (s.tableIgnored) reasons.push('table-ignored')
  return {
    progress: run.integral / s.flashMin,
    ready: atMin !== null,
    readyAtMs: projectCrossing(atMin, nowMs, s.flashMin - run.integral, run.rateNow),
    readyByMs: projectCrossing(atMax, nowMs, s.flashMax - run.integral, run.rateNow),
    recoatWindowEndsAtMs: projectCrossing(atRecoat, nowMs, s.recoat - run.integral, run.rateNow),
    recoatWindowPassed: atRecoat !== null,
    rateNow: run.rateNow,
    airflowAssumed,
    uncertain: run.uncertain || airflowAssumed,
    reasons,
  }
}
