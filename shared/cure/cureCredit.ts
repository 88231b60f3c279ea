// Cure credit: Arrhenius equivalent time at the spec temperature,
//   t_eq = ∫ exp(−Ea/R · (1/T − 1/T_spec)) dt,  T and T_spec in kelvin, counted only while T ≥ minCureTempC.
// Source: the Arrhenius equivalent-age function of ASTM C1074 (maturity method; there Q = E/R), applied to the
// panel. R = 8.314462618 J/(mol·K) (CODATA 2018, exact since the 2019 SI).
// Panel temperature: the panel sensor when it reads, else air temperature through a first-order lag
//   dTp/dt = (T_air − Tp)/τ  →  Tp(t) = T_air + (Tp0 − T_air)·e^(−t/τ) while the air reading holds,
// τ default 6 min. That τ is a working figure of ours, not from a cited source: a lumped-capacitance estimate
// gives roughly 1–3 min for 0.8 mm steel and nearer 8 min for a 3 mm plastic part in booth airflow. Replace it
// with a shop measurement when there is one. Results that used it are marked `estimated`.

import { isFiniteNumber, isRecord, optionalNumber } from './guards'
import type { EstimateReason } from './reasons'
import type { HoldOptions, Sample } from './samples'
import { holdOptionsOf, holdSegments, MS_PER_MINUTE, projectCrossing } from './samples'

export const GAS_CONSTANT_J_PER_MOL_K = 8.314462618
export const ZERO_CELSIUS_K = 273.15
/** Temperatures accepted by the cure functions, °C (air-dry to IR bake). */
export const CURE_MIN_C = -40
export const CURE_MAX_C = 200
export const DEFAULT_HEAT_UP_LAG_MINUTES = 6

function cureTemp(x: unknown): number | null {
  return isFiniteNumber(x) && x >= CURE_MIN_C && x <= CURE_MAX_C ? x : null
}

/**
 * Arrhenius rate relative to the spec temperature: exp(−Ea/R·(1/T − 1/T_spec)), dimensionless.
 * tC, specTempC in −40…200 °C; eaJPerMol ≥ 0 J/mol; else NaN. (ASTM C1074 equivalent-age function.)
 */
export function arrheniusFactor(tC: number, specTempC: number, eaJPerMol: number): number {
  const t = cureTemp(tC)
  const ts = cureTemp(specTempC)
  if (t === null || ts === null || !isFiniteNumber(eaJPerMol) || eaJPerMol < 0) return Number.NaN
  const tK = t + ZERO_CELSIUS_K
  const tsK = ts + ZERO_CELSIUS_K
  return Math.exp((-eaJPerMol / GAS_CONSTANT_J_PER_MOL_K) * (1 / tK - 1 / tsK))
}

/** A cure schedule point of a TDS: `minutes` at `tempC`. */
export interface CureSchedulePoint {
  tempC: number
  minutes: number
}

/**
 * Activation energy, J/mol, from two schedule points that give the same cure (e.g. a bake and an air-dry time):
 * t_a·e^(−Ea/RT_a) = t_b·e^(−Ea/RT_b) → Ea = R·ln(t_a/t_b) / (1/T_a − 1/T_b). Temperatures −40…200 °C and
 * different, minutes > 0; NaN otherwise, and NaN if the points imply warmer = slower (Ea < 0).
 */
export function activationEnergyFromSchedule(a: CureSchedulePoint, b: CureSchedulePoint): number {
  if (!isRecord(a) || !isRecord(b)) return Number.NaN
  const ta = cureTemp(a.tempC)
  const tb = cureTemp(b.tempC)
  const ma = a.minutes
  const mb = b.minutes
  if (ta === null || tb === null || ta === tb) return Number.NaN
  if (!isFiniteNumber(ma) || !isFiniteNumber(mb) || !(ma > 0) || !(mb > 0)) return Number.NaN
  const ea =
    (GAS_CONSTANT_J_PER_MOL_K * Math.log(ma / mb)) / (1 / (ta + ZERO_CELSIUS_K) - 1 / (tb + ZERO_CELSIUS_K))
  return ea >= 0 ? ea : Number.NaN
}

/**
 * Activation energy, J/mol, whose Arrhenius factor equals Q10 between refTempC and refTempC + 10 °C:
 * Ea = R·ln(Q10) / (1/T − 1/(T + 10)), T in K. q10 ≥ 1 (default 2, common practice), refTempC −40…190 °C.
 * The match is exact only around refTempC; pick it near the cure temperatures that matter.
 */
export function activationEnergyFromQ10(q10: number = 2, refTempC: number = 20): number {
  if (!isFiniteNumber(q10) || q10 < 1) return Number.NaN
  const t = cureTemp(refTempC)
  if (t === null || t + 10 > CURE_MAX_C) return Number.NaN
  const tK = t + ZERO_CELSIUS_K
  return (GAS_CONSTANT_J_PER_MOL_K * Math.log(q10)) / (1 / tK - 1 / (tK + 10))
}

/**
 * Panel temperature after `elapsedMinutes` of a first-order lag toward a constant air temperature, °C:
 * Tp = T_air + (Tp0 − T_air)·e^(−t/τ). τ = tauMinutes ≥ 0 (0 = no lag); elapsed ≥ 0; finite °C; else NaN.
 */
export function laggedPanelTempC(
  startPanelC: number,
  airC: number,
  elapsedMinutes: number,
  tauMinutes: number = DEFAULT_HEAT_UP_LAG_MINUTES,
): number {
  if (![startPanelC, airC, elapsedMinutes, tauMinutes].every(isFiniteNumber)) return Number.NaN
  if (elapsedMinutes < 0 || tauMinutes < 0) return Number.NaN
  if (tauMinutes === 0) return airC
  return airC + (startPanelC - airC) * Math.exp(-elapsedMinutes / tauMinutes)
}

export interface CureSpec {
  /** Spec (schedule) temperature, °C, −40…200. */
  specTempC: number
  /** Time required at specTempC, minutes, > 0. */
  requiredMinutes: number
  /** No credit below this panel temperature, °C, −40…specTempC. */
  minCureTempC: number
  /** Activation energy, J/mol, ≥ 0 (see activationEnergyFromSchedule / activationEnergyFromQ10). */
  eaJPerMol: number
}

export interface CureOptions extends HoldOptions {
  /** τ of the air → panel lag, minutes, ≥ 0. Default 6 (working figure, see the file header). */
  heatUpLagMinutes?: number
}

export interface CureCreditResult {
  /** Equivalent minutes at specTempC; NaN on invalid input. */
  equivalentMinutes: number
  /** equivalentMinutes / requiredMinutes. */
  progress: number
  complete: boolean
  /** Exact completion if complete, else now + remaining / rateNow; null if the panel is below minimum or unknown. */
  completeAtMs: number | null
  /** Current Arrhenius factor (0 below minimum); NaN if no usable reading now. */
  rateNow: number
  /** Panel temperature used now (measured or estimated), °C; null if unknown. */
  panelTempNowC: number | null
  /** True when any of it came from the air → panel lag rather than a panel sensor. */
  estimated: boolean
  uncertain: boolean
  reasons: EstimateReason[]
}

function invalidCure(): CureCreditResult {
  return {
    equivalentMinutes: Number.NaN,
    progress: Number.NaN,
    complete: false,
    completeAtMs: null,
    rateNow: Number.NaN,
    panelTempNowC: null,
    estimated: false,
    uncertain: true,
    reasons: ['invalid-input'],
  }
}

/** Sub-steps per τ when integrating along the lag curve (midpoint rule; error well under 0.1 % of the credit). */
const LAG_STEPS_PER_TAU = 20
const MAX_SUBSTEPS_PER_SEGMENT = 10_000

/**
 * Cure credit between startMs and nowMs (epoch ms, now ≥ start). Panel readings are used when present; else the
 * lag on air temperature, starting from the last panel reading or, failing that, from the air temperature. After
 * a gap with no data the lag restarts from the lower of its last state and the air (the safe side). Readings are
 * zero-order held for options.maxHoldMs (default 2 min); beyond that nothing accrues. Never throws.
 */
export function cureCredit(
  spec: CureSpec,
  samples: readonly Sample[],
  startMs: number,
  nowMs: number,
  options?: CureOptions,
): CureCreditResult {
  if (!isRecord(spec)) return invalidCure()
  const specTempC = cureTemp(spec.specTempC)
  const minCure = cureTemp(spec.minCureTempC)
  const required = spec.requiredMinutes
  const ea = spec.eaJPerMol
  const hold = holdOptionsOf(options)
  const lagOption = isRecord(options) ? options.heatUpLagMinutes : undefined
  const tauMin = optionalNumber(lagOption, DEFAULT_HEAT_UP_LAG_MINUTES, (v) => v >= 0)
  if (specTempC === null || minCure === null || minCure > specTempC || hold === null || Number.isNaN(tauMin)) {
    return invalidCure()
  }
  if (!isFiniteNumber(required) || !(required > 0) || !isFiniteNumber(ea) || ea < 0) return invalidCure()
  const series = holdSegments(samples, startMs, nowMs, hold)
  if (series === null) return invalidCure()

  const tauMs = tauMin * MS_PER_MINUTE
  const factor = (tC: number): number => (tC >= minCure ? arrheniusFactor(tC, specTempC, ea) : 0)
  const acc: { eq: number; crossing: number | null } = { eq: 0, crossing: null }
  const accrue = (a: number, b: number, r: number): void => {
    if (!(r > 0)) return
    const before = acc.eq
    acc.eq += (r * (b - a)) / MS_PER_MINUTE
    if (acc.crossing === null && acc.eq >= required) {
      acc.crossing = Math.min(b, a + ((required - before) / r) * MS_PER_MINUTE)
    }
  }

  let tp: number | null = null // lag state: panel temperature, °C
  let afterGap = false
  let uncoveredMs = 0
  let estimated = false
  // Lag state entering a stretch where only air is known.
  const lagStart = (air: number): number => (tp === null ? air : afterGap ? Math.min(tp, air) : tp)

  for (const seg of series.segments) {
    const a = seg.startMs
    const b = seg.endMs
    const panel = cureTemp(seg.values.panelTempC)
    const air = cureTemp(seg.values.airTempC)
    if (panel !== null) {
      tp = panel
      afterGap = false
      accrue(a, b, factor(panel))
      continue
    }
    if (air === null) {
      uncoveredMs += b - a
      afterGap = true
      continue
    }
    estimated = true
    const tp0 = lagStart(air)
    afterGap = false
    if (tauMs === 0 || tp0 === air) {
      tp = air
      accrue(a, b, factor(air))
      continue
    }
    const n = Math.min(MAX_SUBSTEPS_PER_SEGMENT, Math.max(1, Math.ceil((b - a) / (tauMs / LAG_STEPS_PER_TAU))))
    const h = (b - a) / n
    for (let k = 0; k < n; k++) {
      const mid = air + (tp0 - air) * Math.exp(-((k + 0.5) * h) / tauMs)
      accrue(a + k * h, k === n - 1 ? b : a + (k + 1) * h, factor(mid))
    }
    tp = air + (tp0 - air) * Math.exp(-(b - a) / tauMs)
  }

  const panelNow = cureTemp(series.atNow.panelTempC)
  const airNow = cureTemp(series.atNow.airTempC)
  let tNow: number | null = null
  if (panelNow !== null) tNow = panelNow
  else if (airNow !== null) {
    estimated = true
    tNow = tauMs === 0 ? airNow : lagStart(airNow)
  }
  const rateNow = tNow === null ? Number.NaN : factor(tNow)

  const reasons: EstimateReason[] = []
  if (uncoveredMs > 0) reasons.push('data-gap')
  if (tNow === null) reasons.push('no-current-reading')
  else if (tNow < minCure) reasons.push('below-min-cure-now')
  if (estimated) reasons.push('panel-estimated')
  return {
    equivalentMinutes: acc.eq,
    progress: acc.eq / required,
    complete: acc.crossing !== null,
    completeAtMs: projectCrossing(acc.crossing, nowMs, required - acc.eq, rateNow),
    rateNow,
    panelTempNowC: tNow,
    estimated,
    uncertain: uncoveredMs > 0 || tNow === null,
    reasons,
  }
}
