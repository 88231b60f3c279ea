// When booth upkeep is due: by date, by booth hours (time in any mode but idle), by bake cycles, by the filter
// pressure drop reaching its limit, or by the pressure-drop trend projecting the limit within N days.
// Pure; the server gathers the usage figures. The default intervals are invented working figures for the demo
// shop, not a maker's schedule: the booth maker's manual and local codes decide, and each booth can override them.

import type { UpkeepTask } from './types'
import { daysToLimit, linearTrend, type TrendPoint } from './trend'

export type RuleTask = Exclude<UpkeepTask, 'calibration'>
export const RULE_TASKS: readonly RuleTask[] = ['intake_filter', 'exhaust_filter', 'inspection', 'heater_service']

export const TASK_LABELS: Record<UpkeepTask, string> = {
  intake_filter: 'Intake filter change',
  exhaust_filter: 'Exhaust filter change',
  inspection: 'Booth inspection',
  heater_service: 'Heater service',
  calibration: 'Sensor calibration',
}

export interface UpkeepRule {
  task: RuleTask
  intervalDays: number | null
  intervalBoothHours: number | null
  intervalBakeCycles: number | null
  /** Filters only: the pressure drop at which the filter is spent, Pa. */
  dpLimitPa: number | null
  /** Filters only: remind when the trend reaches the limit within this many days. */
  trendHorizonDays: number | null
}

export const DEFAULT_RULES: Readonly<Record<RuleTask, UpkeepRule>> = Object.freeze({
  intake_filter: { task: 'intake_filter', intervalDays: 180, intervalBoothHours: 800, intervalBakeCycles: null, dpLimitPa: 200, trendHorizonDays: 7 },
  exhaust_filter: { task: 'exhaust_filter', intervalDays: 60, intervalBoothHours: 200, intervalBakeCycles: null, dpLimitPa: 250, trendHorizonDays: 7 },
  inspection: { task: 'inspection', intervalDays: 30, intervalBoothHours: null, intervalBakeCycles: null, dpLimitPa: null, trendHorizonDays: null },
  heater_service: { task: 'heater_service', intervalDays: 365, intervalBoothHours: null, intervalBakeCycles: 500, dpLimitPa: null, trendHorizonDays: null },
})

/** The trend looks back this far (and never before the last filter change). */
export const TREND_WINDOW_DAYS = 7

export interface TaskUsage {
  lastDoneAtMs: number | null
  /** Hours in spray / flash / bake / cool since the last time (or since records began). */
  boothHoursSince: number | null
  bakeCyclesSince: number | null
  /** Filters: pressure-drop points since the last change within the trend window, Pa. */
  dpPoints?: readonly TrendPoint[]
  /** Filters: the latest pressure drop at working airflow, Pa. */
  latestDpPa?: number | null
}

export type ReminderStatus = 'due' | 'soon' | 'ok'
export type ReminderBy = 'never' | 'date' | 'hours' | 'cycles' | 'limit' | 'trend'

export interface ReminderReason {
  by: ReminderBy
  status: ReminderStatus
  message: string
  /** When it is (or was) due, epoch ms, where that is a date. */
  dueAtMs: number | null
}

export interface Reminder {
  task: UpkeepTask
  label: string
  status: ReminderStatus
  lastDoneAtMs: number | null
  /** Every check that applies, worst first. */
  reasons: ReminderReason[]
  trend?: { slopePaPerDay: number; daysToLimit: number | null; points: number } | null
}

export interface ReminderOptions {
  /** "Soon" this many days before a date, default 7. */
  soonDays?: number
  /** "Soon" at this fraction of an hours / cycles interval, default 0.9. */
  soonFraction?: number
  /** A trend needs at least this many points and this span, default 6 points over 1 day. */
  minTrendPoints?: number
  minTrendSpanDays?: number
}

const DAY_MS = 86_400_000
const ORDER: Record<ReminderStatus, number> = { due: 0, soon: 1, ok: 2 }
const one = (x: number) => (Math.round(x * 10) / 10).toString()
const dateText = (ms: number) => new Date(ms).toISOString().slice(0, 10)

function worst(reasons: readonly ReminderReason[]): ReminderStatus {
  return reasons.reduce<ReminderStatus>((acc, r) => (ORDER[r.status] < ORDER[acc] ? r.status : acc), 'ok')
}

const positive = (x: number | null | undefined): x is number => typeof x === 'number' && Number.isFinite(x) && x > 0

/** One task's reminder from its rule and the usage since it was last done. */
export function upkeepReminder(rule: UpkeepRule, usage: TaskUsage, nowMs: number, options: ReminderOptions = {}): Reminder {
  const soonDays = options.soonDays ?? 7
  const soonFraction = options.soonFraction ?? 0.9
  const reasons: ReminderReason[] = []
  const last = usage.lastDoneAtMs

  if (positive(rule.intervalDays)) {
    if (last === null) {
      reasons.push({ by: 'never', status: 'due', message: 'No record yet', dueAtMs: null })
    } else {
      const dueAt = last + rule.intervalDays * DAY_MS
      const status: ReminderStatus = nowMs >= dueAt ? 'due' : nowMs >= dueAt - soonDays * DAY_MS ? 'soon' : 'ok'
      const message = status === 'due' ? `Due since ${dateText(dueAt)} (every ${one(rule.intervalDays)} days)` : `Due on ${dateText(dueAt)} (every ${one(rule.intervalDays)} days)`
      reasons.push({ by: 'date', status, message, dueAtMs: dueAt })
    }
  }
  if (positive(rule.intervalBoothHours) && usage.boothHoursSince !== null && Number.isFinite(usage.boothHoursSince)) {
    const h = usage.boothHoursSince
    const status: ReminderStatus = h >= rule.intervalBoothHours ? 'due' : h >= soonFraction * rule.intervalBoothHours ? 'soon' : 'ok'
    reasons.push({ by: 'hours', status, message: `${one(h)} of ${one(rule.intervalBoothHours)} booth hours used`, dueAtMs: null })
  }
  if (positive(rule.intervalBakeCycles) && usage.bakeCyclesSince !== null && Number.isFinite(usage.bakeCyclesSince)) {
    const c = usage.bakeCyclesSince
    const status: ReminderStatus = c >= rule.intervalBakeCycles ? 'due' : c >= soonFraction * rule.intervalBakeCycles ? 'soon' : 'ok'
    reasons.push({ by: 'cycles', status, message: `${c} of ${rule.intervalBakeCycles} bake cycles`, dueAtMs: null })
  }

  let trendInfo: Reminder['trend'] = null
  if (positive(rule.dpLimitPa)) {
    const latest = usage.latestDpPa
    if (typeof latest === 'number' && Number.isFinite(latest)) {
      const status: ReminderStatus = latest >= rule.dpLimitPa ? 'due' : 'ok'
      reasons.push({ by: 'limit', status, message: `Pressure drop ${one(latest)} Pa (limit ${one(rule.dpLimitPa)} Pa)`, dueAtMs: null })
    }
    const pts = usage.dpPoints ?? []
    const trend = linearTrend(pts)
    const enough = trend.valid && trend.n >= (options.minTrendPoints ?? 6) && trend.spanDays >= (options.minTrendSpanDays ?? 1)
    if (enough) {
      const days = daysToLimit(trend, nowMs, rule.dpLimitPa)
      trendInfo = { slopePaPerDay: trend.slopePerDay, daysToLimit: days, points: trend.n }
      const horizon = positive(rule.trendHorizonDays) ? rule.trendHorizonDays : 7
      if (days !== null) {
        const status: ReminderStatus = days <= horizon ? 'due' : days <= 2 * horizon ? 'soon' : 'ok'
        const message =
          days === 0
            ? `The trend line is at the ${one(rule.dpLimitPa)} Pa limit already`
            : `At the recent rate (+${one(trend.slopePerDay)} Pa a day) it reaches ${one(rule.dpLimitPa)} Pa in about ${one(days)} days`
        reasons.push({ by: 'trend', status, message, dueAtMs: nowMs + days * DAY_MS })
      } else {
        reasons.push({ by: 'trend', status: 'ok', message: 'Pressure drop is not rising', dueAtMs: null })
      }
    }
  }
  reasons.sort((a, b) => ORDER[a.status] - ORDER[b.status])
  return { task: rule.task, label: TASK_LABELS[rule.task], status: worst(reasons), lastDoneAtMs: last, reasons, trend: trendInfo }
}

/** A channel's calibration: due from the next-due date the tech set at the last calibration. */
export function calibrationReminder(
  channelLabel: string,
  lastAtMs: number | null,
  nextDueAtMs: number | null,
  nowMs: number,
  options: ReminderOptions = {},
): Reminder {
  const soonDays = options.soonDays ?? 7
  const reasons: ReminderReason[] = []
  if (nextDueAtMs !== null) {
    const status: ReminderStatus = nowMs >= nextDueAtMs ? 'due' : nowMs >= nextDueAtMs - soonDays * DAY_MS ? 'soon' : 'ok'
    reasons.push({ by: 'date', status, message: `${channelLabel}: ${status === 'due' ? 'due since' : 'due on'} ${dateText(nextDueAtMs)}`, dueAtMs: nextDueAtMs })
  }
  return { task: 'calibration', label: `${TASK_LABELS.calibration} — ${channelLabel}`, status: worst(reasons), lastDoneAtMs: lastAtMs, reasons, trend: null }
}

/** A rule with the booth's overrides over the defaults (null fields in an override switch that check off). */
export function effectiveRule(task: RuleTask, override?: Partial<UpkeepRule> | null): UpkeepRule {
  const d = DEFAULT_RULES[task]
  if (!override) return { ...d }
  return {
    task,
    intervalDays: override.intervalDays !== undefined ? override.intervalDays : d.intervalDays,
    intervalBoothHours: override.intervalBoothHours !== undefined ? override.intervalBoothHours : d.intervalBoothHours,
    intervalBakeCycles: override.intervalBakeCycles !== undefined ? override.intervalBakeCycles : d.intervalBakeCycles,
    dpLimitPa: override.dpLimitPa !== undefined ? override.dpLimitPa : d.dpLimitPa,
    trendHorizonDays: override.trendHorizonDays !== undefined ? override.trendHorizonDays : d.trendHorizonDays,
  }
}
