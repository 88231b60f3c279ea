// Pass / fail of a bake against the cure schedules of the products in it.
//
// Each schedule is judged on its own: the cure credit (Arrhenius equivalent minutes at the schedule
// temperature, shared/cure/cureCredit.ts) over the bake must reach the schedule's required minutes. The time
// actually held at or above the schedule temperature is reported beside it, because that is what a reviewer
// reads first ("held 22 min at ≥ 60 °C; needs 30 min equivalent; cure credit 24.5 min → fail").
// A product's schedules are alternatives (a TDS gives "30 min at 60 °C, or 20 min at 70 °C"): the product passes
// when one of them does. The bake passes when every product passes.
// Only force-dry / bake schedules (≥ FORCE_DRY_MIN_C) are applicable to a bake, unless a product has no other.

import { cureCredit, type CureSpec } from '../cure/cureCredit'
import type { EstimateReason } from '../cure/reasons'
import { minutesAtOrAbove, type BakeSample } from './phases'

/** Schedules at or above this temperature are force-dry or bake schedules (our line; air-dry sits near 20 °C). */
export const FORCE_DRY_MIN_C = 40

export interface BakeSchedule {
  /** Stable key within the bake, e.g. `job-3/rev-12/0`. */
  key: string
  /** Plain words, e.g. "2K high-solids clearcoat — 30 min at 60 °C". */
  label: string
  spec: CureSpec
  jobId: number | null
  jobNumber?: string | null
  revisionId: number | null
  productName?: string | null
}

export type Verdict = 'pass' | 'fail' | 'pending' | 'unknown'

export interface ScheduleVerdict {
  key: string
  label: string
  jobId: number | null
  jobNumber: string | null
  revisionId: number | null
  productName: string | null
  specTempC: number
  requiredMinutes: number
  minCureTempC: number
  verdict: Verdict
  /** Cure credit, equivalent minutes at specTempC (NaN → null). */
  equivalentMinutes: number | null
  progress: number | null
  /** Minutes with the panel at or above specTempC. */
  heldMinutes: number | null
  /** Reached (past) or projected (running bake) completion, epoch ms; null when unknown. */
  completeAtMs: number | null
  estimated: boolean
  uncertain: boolean
  reasons: EstimateReason[]
  /** One line in °C, for records and events. */
  reason: string
}

export interface ProductVerdict {
  jobId: number | null
  jobNumber: string | null
  revisionId: number | null
  productName: string | null
  verdict: Verdict
  schedules: ScheduleVerdict[]
  /** The earliest completion among the alternatives. */
  completeAtMs: number | null
}

export interface BakeJudgement {
  verdict: Verdict
  products: ProductVerdict[]
  /** When every product is cured (the latest of the products' completions); null when unknown. */
  cureCompleteAtMs: number | null
  /** The schedule temperature the booth should hold (see holdTargetOf), °C. */
  holdTargetC: number | null
}

export interface JudgeOptions {
  /** The bake is still running: an incomplete schedule is pending, not failed. */
  running?: boolean
  heatUpLagMinutes?: number
  maxHoldMs?: number
}

/** "24.5", "30", "1.2": one decimal, none when whole. */
export function minutesText(x: number): string {
  if (!Number.isFinite(x)) return '—'
  const r = Math.round(x * 10) / 10
  return Number.isInteger(r) ? String(r) : r.toFixed(1)
}

function tempText(c: number): string {
  return `${minutesText(c)} °C`
}

/** The schedules a bake is judged against: force-dry / bake ones when there are any, else all given. */
export function applicableSchedules<T extends { spec: CureSpec }>(schedules: readonly T[]): T[] {
  const bake = schedules.filter((s) => Number.isFinite(s.spec?.specTempC) && s.spec.specTempC >= FORCE_DRY_MIN_C)
  return bake.length ? bake : [...schedules]
}

/** One schedule against the readings of a bake over [startMs, endMs] (endMs = now while running). */
export function judgeSchedule(
  schedule: BakeSchedule,
  samples: readonly BakeSample[],
  startMs: number,
  endMs: number,
  options: JudgeOptions = {},
): ScheduleVerdict {
  const spec = schedule.spec
  const cc = cureCredit(spec, samples, startMs, endMs, {
    ...(options.heatUpLagMinutes !== undefined ? { heatUpLagMinutes: options.heatUpLagMinutes } : {}),
    ...(options.maxHoldMs !== undefined ? { maxHoldMs: options.maxHoldMs } : {}),
  })
  const held = minutesAtOrAbove(samples, startMs, endMs, spec.specTempC, { maxGapMs: options.maxHoldMs })
  const base = {
    key: schedule.key,
    label: schedule.label,
    jobId: schedule.jobId,
    jobNumber: schedule.jobNumber ?? null,
    revisionId: schedule.revisionId,
    productName: schedule.productName ?? null,
    specTempC: spec.specTempC,
    requiredMinutes: spec.requiredMinutes,
    minCureTempC: spec.minCureTempC,
    estimated: cc.estimated,
    uncertain: cc.uncertain,
    reasons: cc.reasons,
  }
  if (cc.reasons.includes('invalid-input') || !Number.isFinite(cc.equivalentMinutes)) {
    return {
      ...base,
      verdict: 'unknown',
      equivalentMinutes: null,
      progress: null,
      heldMinutes: Number.isFinite(held) ? held : null,
      completeAtMs: null,
      reason: 'the schedule or the readings cannot be used (check the spec sheet and the bake times) → unknown',
    }
  }
  const verdict: Verdict = cc.complete ? 'pass' : options.running ? 'pending' : 'fail'
  const extras: string[] = []
  if (cc.estimated) extras.push('panel temperature estimated from air')
  if (cc.reasons.includes('data-gap')) extras.push('readings missing for part of the bake')
  const reason =
    `held ${minutesText(held)} min at ≥ ${tempText(spec.specTempC)}; needs ${minutesText(spec.requiredMinutes)} min equivalent; ` +
    `cure credit ${minutesText(cc.equivalentMinutes)} min` +
    (extras.length ? ` (${extras.join('; ')})` : '') +
    ` → ${verdict}`
  return {
    ...base,
    verdict,
    equivalentMinutes: cc.equivalentMinutes,
    progress: cc.progress,
    heldMinutes: held,
    // A finished bake that did not cure has no completion time (the projection would be after the end).
    completeAtMs: cc.complete || options.running ? cc.completeAtMs : null,
    reason,
  }
}

/**
 * The temperature a booth should hold for these schedules, °C: per product the lowest of its bake schedules
 * (any one alternative will do), then the highest over the products (every product must cure). null without
 * a bake schedule.
 */
export function holdTargetOf(schedules: readonly BakeSchedule[]): number | null {
  const perProduct = new Map<string, number>()
  for (const s of schedules) {
    const t = s.spec?.specTempC
    if (!Number.isFinite(t) || t < FORCE_DRY_MIN_C) continue
    const k = `${s.jobId ?? '-'}/${s.revisionId ?? '-'}`
    perProduct.set(k, Math.min(perProduct.get(k) ?? Number.POSITIVE_INFINITY, t))
  }
  return perProduct.size ? Math.max(...perProduct.values()) : null
}

const RANK: Record<Verdict, number> = { pass: 3, pending: 2, fail: 1, unknown: 0 }

/**
 * Judges every applicable schedule, groups them per product (job + revision), and combines: a product passes
 * when one alternative passes; the bake passes when all products pass, fails when one fails, is pending while a
 * running bake has products still curing, and is unknown with no usable schedule.
 */
export function judgeBake(
  schedules: readonly BakeSchedule[],
  samples: readonly BakeSample[],
  startMs: number,
  endMs: number,
  options: JudgeOptions = {},
): BakeJudgement {
  const groups = new Map<string, BakeSchedule[]>()
  for (const s of schedules) {
    const k = `${s.jobId ?? '-'}/${s.revisionId ?? '-'}`
    const list = groups.get(k) ?? []
    list.push(s)
    groups.set(k, list)
  }
  const products: ProductVerdict[] = []
  for (const list of groups.values()) {
    const judged = applicableSchedules(list).map((s) => judgeSchedule(s, samples, startMs, endMs, options))
    const best = judged.reduce<Verdict>((acc, j) => (RANK[j.verdict] > RANK[acc] ? j.verdict : acc), 'unknown')
    const times = judged.map((j) => j.completeAtMs).filter((t): t is number => t !== null)
    const first = list[0]!
    products.push({
      jobId: first.jobId,
      jobNumber: first.jobNumber ?? null,
      revisionId: first.revisionId,
      productName: first.productName ?? null,
      verdict: best,
      schedules: judged,
      completeAtMs: times.length ? Math.min(...times) : null,
    })
  }
  let verdict: Verdict = 'unknown'
  if (products.length) {
    if (products.some((p) => p.verdict === 'fail')) verdict = 'fail'
    else if (products.some((p) => p.verdict === 'unknown')) verdict = 'unknown'
    else if (products.some((p) => p.verdict === 'pending')) verdict = 'pending'
    else verdict = 'pass'
  }
  const ends = products.map((p) => p.completeAtMs)
  const cureCompleteAtMs = ends.length && ends.every((t): t is number => t !== null) ? Math.max(...ends) : null
  return { verdict, products, cureCompleteAtMs, holdTargetC: holdTargetOf(schedules) }
}
