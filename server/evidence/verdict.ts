import type { ConditionStats, CoatVerdict, EvidenceReport } from './types'

// The plain verdict of one coat's flash-off, as the evidence report states it: the time actually waited
// (next coat start − this coat's finish) against the flash the data sheet requires at the measured
// conditions (the cure engine's flash progress over the stored, calibrated readings). Pure.
//
// Recoat window: judged only when the data sheet gives one explicitly. The engine ends the window at
// the longest flash of the range by default, but for a report that would call every long wait (a
// primer sanded the next morning) a failure, which no data sheet says.

export interface VerdictInput {
  finished: boolean
  /** A later coat of the same job exists (its start ends this coat's flash). */
  hasNextCoat: boolean
  /** This is the last coat of the plan (the bake or air-dry follows). */
  lastOfPlan: boolean
  waitedMinutes: number | null
  requiredMinutes: number | null
  /** Flash progress at the next coat's start; NaN / null = unknown. */
  progress: number | null
  /** The data sheet gives an explicit recoat window and it had passed at the next start. */
  recoatWindowPassed: boolean
  recoatWindowMinutes: number | null
  uncertain: boolean
  reasons: readonly string[]
  stats: ConditionStats | null
  waterborne: boolean
  /** Reasons the painter gave for going past a guard rail at the next coat's start. */
  overrideReasons: readonly string[]
}

/** "7.5", "9", "12.3": one decimal, none when whole; "—" when not finite. */
export function num1(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—'
  const r = Math.round(x * 10) / 10
  return Number.isInteger(r) ? String(r) : r.toFixed(1)
}

/** "17 °C / 64 % RH" (and "/ 0.4 m/s" for a waterborne product) from the mean conditions; '' when unknown. */
export function conditionsText(stats: ConditionStats | null, waterborne: boolean): string {
  if (!stats || !stats.airTempC) return ''
  const parts = [`${num1(stats.airTempC.mean)} °C`]
  if (stats.rhPct) parts.push(`${Math.round(stats.rhPct.mean)} % RH`)
  if (waterborne && stats.airflowMps) parts.push(`${num1(stats.airflowMps.mean)} m/s`)
  return parts.join(' / ')
}

function caveat(i: VerdictInput): string {
  if (!i.uncertain) return ''
  if (i.reasons.includes('data-gap')) return ' (estimate: readings missing for part of the flash)'
  if (i.reasons.includes('airflow-assumed')) return ' (estimate: no airflow reading, the reference air speed was assumed)'
  return ' (estimate)'
}

function overrides(i: VerdictInput): string {
  const rs = [...new Set(i.overrideReasons.map((r) => r.trim()).filter(Boolean))]
  return rs.length ? `; painter's reason: "${rs.join('"; "')}"` : ''
}

export function coatVerdict(i: VerdictInput): CoatVerdict {
  if (!i.finished) return { code: 'in_progress', reason: 'the coat has no finish time: still being sprayed when the pack was made' }
  if (!i.hasNextCoat) {
    return i.lastOfPlan
      ? { code: 'last_coat', reason: 'last coat of the finish plan: the bake or air-dry follows (see Bake)' }
      : { code: 'in_progress', reason: 'no later coat recorded yet: the flash-off was still running when the pack was made' }
  }
  const waited = `waited ${num1(i.waitedMinutes)} min`
  const at = conditionsText(i.stats, i.waterborne)
  const atText = at ? ` at ${at}` : ''
  if (!i.stats || i.stats.n === 0) {
    return { code: 'unknown', reason: `${waited}; no readings during the flash → cannot be judged against the data sheet${overrides(i)}` }
  }
  const progress = i.progress !== null && Number.isFinite(i.progress) ? i.progress : null
  if (progress === null) {
    return { code: 'unknown', reason: `${waited}; the flash could not be computed from the readings and the data sheet → cannot be judged${overrides(i)}` }
  }
  const needed = i.requiredMinutes !== null && Number.isFinite(i.requiredMinutes) ? `${num1(i.requiredMinutes)} min needed${atText}` : `flash ${Math.floor(progress * 100)} % done${atText}`
  if (progress >= 1) {
    if (i.recoatWindowPassed) {
      return {
        code: 'past_window',
        reason: `${waited}; ${needed}, recoat window ${num1(i.recoatWindowMinutes)} min → past the data sheet's recoat window${caveat(i)}${overrides(i)}`,
      }
    }
    return { code: 'followed', reason: `${waited}; ${needed} → followed the data sheet${caveat(i)}${overrides(i)}` }
  }
  return { code: 'too_early', reason: `${waited}; ${needed} → recoated before the flash-off was complete${caveat(i)}${overrides(i)}` }
}

export const VERDICT_LABELS: Record<CoatVerdict['code'], string> = {
  followed: 'Followed the data sheet',
  too_early: 'Too early',
  past_window: 'Past recoat window',
  unknown: 'Cannot be judged',
  last_coat: 'Last coat',
  in_progress: 'In progress',
}

/** How many coats got each verdict. */
export function countVerdicts(r: Pick<EvidenceReport, 'coats'>): Record<string, number> {
  const out: Record<string, number> = {}
  for (const coat of r.coats) out[coat.verdict.code] = (out[coat.verdict.code] ?? 0) + 1
  return out
}
