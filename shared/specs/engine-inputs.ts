// Spec revision → cure engine inputs. Pure: no Nuxt, Vue or database imports, so the preview, the
// jobs code (coats, mixes, bakes) and the client can all use the same mapping.
//
// A revision is stored as SpecRevisionFields (shared/schemas/spec.ts, SI units); its product adds
// chemistry and components. Missing optional values are left out of the engine specs (never passed
// as null), so the engine's documented defaults apply (shared/cure/README.md).

import {
  activationEnergyFromQ10,
  activationEnergyFromSchedule,
  type ApplicationLimits,
  type CureSpec,
  type FlashSpec,
  type PotLifeSpec,
  type ReducerBand,
} from '../cure'
import type { ProductEngineFields, SpecRevisionFields } from '../schemas/spec'

/** Which flash of a coat: between two coats of the product, or after its last coat before the next product. */
export type FlashStage = 'between-coats' | 'before-next'

/** Used when a revision with bake schedules has no minimum cure temperature (older data): a common TDS floor. */
export const DEFAULT_MIN_CURE_TEMP_C = 10

const has = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v)

/**
 * The FlashSpec of a coat of this product.
 * - 'between-coats' (default): flash min–max of the TDS; the recoat window, when given, ends the window
 *   (else the engine ends it at the longest flash).
 * - 'before-next': the flash before the next product as both min and max; the recoat window applies
 *   when it is not shorter than that flash.
 * Solvent-borne: Q10, or the flash table when the TDS gives one. Waterborne: the reference humidity,
 * air velocity and airflow exponent of the revision, else the engine defaults (50 %, 0.3 m/s, 0.5).
 */
export function toFlashSpec(product: ProductEngineFields, revision: SpecRevisionFields, stage: FlashStage = 'between-coats'): FlashSpec {
  const min = stage === 'before-next' ? revision.flashBeforeNextMinutes : revision.flashMinMinutes
  const max = stage === 'before-next' ? revision.flashBeforeNextMinutes : revision.flashMaxMinutes
  const spec: FlashSpec = {
    chemistry: product.chemistry,
    flashMinMinutes: min,
    flashMaxMinutes: max,
    refTempC: revision.refTempC,
    q10: revision.q10,
  }
  if (has(revision.recoatWindowMinutes) && revision.recoatWindowMinutes >= max) spec.recoatWindowMinutes = revision.recoatWindowMinutes
  if (product.chemistry === 'solvent') {
    if (revision.flashTable && revision.flashTable.length >= 2) spec.table = revision.flashTable.map((r) => ({ tempC: r.tempC, minutes: r.minutes }))
  } else {
    if (has(revision.wbRefRhPct)) spec.refRhPct = revision.wbRefRhPct
    if (has(revision.wbRefAirflowMps)) spec.refAirflowMps = revision.wbRefAirflowMps
    if (has(revision.wbAirflowExponent)) spec.airflowExponent = revision.wbAirflowExponent
  }
  return spec
}

/**
 * The PotLifeSpec of a mix of this product: the TDS pot life at the reference temperature, scaled with
 * the revision's Q10. null when the revision gives no pot life (a 1K product; 2K revisions must give one).
 */
export function toPotLifeSpec(_product: ProductEngineFields, revision: SpecRevisionFields): PotLifeSpec | null {
  if (!has(revision.potLifeMinutes)) return null
  return { potLifeMinutes: revision.potLifeMinutes, refTempC: revision.refTempC, q10: revision.q10 }
}

/** A point of the TDS cure schedule: the same cure state reached after `minutes` at `tempC`. */
export interface CurePoint {
  tempC: number
  minutes: number
  /** A bake schedule of the revision, or its air-dry time to sand / polish at the reference temperature. */
  source: 'bake' | 'air-dry'
}

/**
 * The cure schedule points of a revision: every bake schedule, plus the air-dry time to sand / polish at
 * the reference temperature (a TDS usually gives "bake 30 min at 60 °C or air-dry 16 h at 20 °C" for the same
 * state) unless a bake schedule already has that temperature. Sorted coldest first.
 */
export function curePoints(revision: SpecRevisionFields): CurePoint[] {
  const points: CurePoint[] = revision.bakeSchedules.map((b) => ({ tempC: b.objectTempC, minutes: b.minutes, source: 'bake' }))
  if (has(revision.sandPolishMinutes) && !points.some((p) => p.tempC === revision.refTempC)) {
    points.push({ tempC: revision.refTempC, minutes: revision.sandPolishMinutes, source: 'air-dry' })
  }
  return points.sort((a, b) => a.tempC - b.tempC)
}

export interface ActivationEnergy {
  /** J/mol. */
  eaJPerMol: number
  /** 'schedule': from two cure points of the TDS; 'q10': from the revision's Q10 at its reference temperature. */
  source: 'schedule' | 'q10'
  /** The two points used when source is 'schedule' (coldest, hottest). */
  points: [CurePoint, CurePoint] | null
}

/**
 * Activation energy for the cure credit of a revision. With two or more cure points at different
 * temperatures: from the coldest and the hottest (the widest span, least sensitive to the rounding of
 * TDS times) by activationEnergyFromSchedule. Otherwise, or when the points imply warmer = slower: from
 * Q10 at the reference temperature (activationEnergyFromQ10).
 */
export function activationEnergyOf(revision: SpecRevisionFields): ActivationEnergy {
  const points = curePoints(revision)
  if (points.length >= 2) {
    const cold = points[0]!
    const hot = points[points.length - 1]!
    if (hot.tempC > cold.tempC) {
      const ea = activationEnergyFromSchedule({ tempC: cold.tempC, minutes: cold.minutes }, { tempC: hot.tempC, minutes: hot.minutes })
      if (Number.isFinite(ea)) return { eaJPerMol: ea, source: 'schedule', points: [cold, hot] }
    }
  }
  return { eaJPerMol: activationEnergyFromQ10(revision.q10, revision.refTempC), source: 'q10', points: null }
}

/**
 * One CureSpec per bake schedule, in the order of revision.bakeSchedules (index i ↔ schedule i): the
 * schedule's object temperature and time, the revision's minimum cure temperature (capped at the schedule
 * temperature; DEFAULT_MIN_CURE_TEMP_C when missing) and the activation energy of activationEnergyOf.
 * Empty when the TDS gives no bake schedule.
 */
export function toCureSpecs(_product: ProductEngineFields, revision: SpecRevisionFields): CureSpec[] {
  if (!revision.bakeSchedules.length) return []
  const { eaJPerMol } = activationEnergyOf(revision)
  const floor = has(revision.minCureTempC) ? revision.minCureTempC : DEFAULT_MIN_CURE_TEMP_C
  return revision.bakeSchedules.map((b) => ({
    specTempC: b.objectTempC,
    requiredMinutes: b.minutes,
    minCureTempC: Math.min(floor, b.objectTempC),
    eaJPerMol,
  }))
}

/**
 * A CureSpec for the air-dry times (dust-free, handle, sand / polish) at the reference temperature, so they
 * can be stretched or shortened by the booth temperature like a bake: requiredMinutes = the given time.
 * null when that time is missing.
 */
export function toAirDrySpec(revision: SpecRevisionFields, minutes: number | null): CureSpec | null {
  if (!has(minutes)) return null
  const floor = has(revision.minCureTempC) ? revision.minCureTempC : DEFAULT_MIN_CURE_TEMP_C
  return {
    specTempC: revision.refTempC,
    requiredMinutes: minutes,
    minCureTempC: Math.min(floor, revision.refTempC),
    eaJPerMol: activationEnergyOf(revision).eaJPerMol,
  }
}

/** The TDS reducer bands in the engine's shape: [minC, maxC), open ends as −Infinity / Infinity. */
export function reducerBands(revision: SpecRevisionFields): ReducerBand[] {
  return revision.reducerBands.map((b) => ({
    minC: has(b.fromC) ? b.fromC : Number.NEGATIVE_INFINITY,
    maxC: has(b.toC) ? b.toC : Number.POSITIVE_INFINITY,
    grade: b.grade,
  }))
}

/** The application limits of the TDS in the engine's shape; limits the TDS does not give are left out. */
export function applicationLimits(revision: SpecRevisionFields): ApplicationLimits {
  const out: ApplicationLimits = {}
  if (has(revision.minAirTempC)) out.minTempC = revision.minAirTempC
  if (has(revision.maxAirTempC)) out.maxTempC = revision.maxAirTempC
  if (has(revision.minRhPct)) out.minRhPct = revision.minRhPct
  if (has(revision.maxRhPct)) out.maxRhPct = revision.maxRhPct
  return out
}
