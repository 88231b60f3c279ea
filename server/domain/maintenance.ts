import type { Kysely } from 'kysely'
import { CHANNEL_INFO, type CalibratedChannel } from '#shared/bake/channels'
import { INSPECTION_ITEMS } from '#shared/bake/inspection'
import { calibrationReminder, effectiveRule, RULE_TASKS, TREND_WINDOW_DAYS, upkeepReminder, type Reminder, type RuleTask, type UpkeepRule } from '#shared/bake/reminders'
import type { FilterChangeInput, InspectionInput, NoteInput, RuleInput } from '#shared/bake/schemas'
import type { BoothMode, Database } from '../db/database'
import type { MaintenanceRuleRow } from '../db/tables/bakes'
import { countBakes, listBakes } from '../repositories/bakes'
import { findBooth, listBooths, type BoothRow } from '../repositories/booths'
import { latestCalibrationPerChannel } from '../repositories/calibrations'
import {
  filterDpHourly,
  firstModeAt,
  insertFilterChange,
  insertInspection,
  insertNote,
  lastFilterChange,
  lastInspection,
  lastNoteOfKind,
  listCalibrationsInRange,
  listFilterChanges,
  listInspections,
  listNotes,
  listRules,
  modeHours,
  upsertRule,
} from '../repositories/maintenance'
import { applyCalibration, calibrationsReady } from './calibration'
import { actorOf, recorded } from './event-log'

// Booth upkeep: filter changes, inspections, notes and heater service records (each with its event), the
// reminder rules per booth, the reminders themselves (shared/bake/reminders.ts decides; this gathers the
// usage), the hour and bake-cycle counters, and the booth's upkeep history.

type Db = Kysely<Database>
type Who = { id: number; name: string; role: string }

const DAY_MS = 86_400_000
const CLOCK_SLACK_MS = 5 * 60_000

export class MaintenanceError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
  ) {
    super(message)
  }
}

async function boothOrThrow(db: Db, boothId: number): Promise<BoothRow> {
  const b = await findBooth(db, boothId)
  if (!b) throw new MaintenanceError(404, 'No such booth')
  return b
}

function timeOf(isoText: string | undefined, nowMs: number, what: string): Date {
  const ms = isoText ? Date.parse(isoText) : nowMs
  if (ms > nowMs + CLOCK_SLACK_MS) throw new MaintenanceError(400, `The ${what} cannot be in the future`)
  return new Date(ms)
}

const iso = (d: Date | null) => (d ? d.toISOString() : null)

// ── records ──────────────────────────────────────────────────────────────────────────────────────

export async function recordFilterChange(db: Db, user: Who, input: FilterChangeInput, nowMs = Date.now()) {
  await boothOrThrow(db, input.boothId)
  const at = timeOf(input.changedAt, nowMs, 'change time')
  const row = await recorded(
    db,
    (tx) =>
      insertFilterChange(tx, {
        booth_id: input.boothId,
        filter: input.filter,
        changed_at: at,
        dp_before_pa: input.dpBeforePa ?? null,
        dp_after_pa: input.dpAfterPa ?? null,
        notes: input.notes ?? '',
        recorded_by: user.id,
      }),
    (r) => ({
      type: 'maintenance.filter_changed',
      actor: actorOf(user),
      subject: { type: 'filter_change', id: r.id },
      data: { boothId: r.booth_id, filter: r.filter, changedAt: r.changed_at.toISOString(), dpBeforePa: r.dp_before_pa, dpAfterPa: r.dp_after_pa, notes: r.notes },
    }),
  )
  return { id: row.id, boothId: row.booth_id, filter: row.filter, changedAt: row.changed_at.toISOString(), dpBeforePa: row.dp_before_pa, dpAfterPa: row.dp_after_pa, notes: row.notes }
}

export async function recordInspection(db: Db, user: Who, input: InspectionInput, nowMs = Date.now()) {
  await boothOrThrow(db, input.boothId)
  const at = timeOf(input.inspectedAt, nowMs, 'inspection time')
  // Checklist order, whatever order the form sent.
  const items = INSPECTION_ITEMS.map((it) => {
    const given = input.items.find((i) => i.key === it.key)!
    return { key: it.key, ok: given.ok, ...(given.note ? { note: given.note } : {}) }
  })
  const allOk = items.every((i) => i.ok)
  const row = await recorded(
    db,
    (tx) => insertInspection(tx, { booth_id: input.boothId, inspected_at: at, items: JSON.stringify(items), all_ok: allOk, notes: input.notes ?? '', recorded_by: user.id }),
    (r) => ({
      type: 'maintenance.inspected',
      actor: actorOf(user),
      subject: { type: 'inspection', id: r.id },
      data: { boothId: r.booth_id, inspectedAt: r.inspected_at.toISOString(), allOk, items, notes: r.notes },
    }),
  )
  return { id: row.id, boothId: row.booth_id, inspectedAt: row.inspected_at.toISOString(), allOk, items, notes: row.notes }
}

export async function recordNote(db: Db, user: Who, input: NoteInput, nowMs = Date.now()) {
  await boothOrThrow(db, input.boothId)
  const at = timeOf(input.notedAt, nowMs, 'time')
  const row = await recorded(
    db,
    (tx) => insertNote(tx, { booth_id: input.boothId, kind: input.kind, noted_at: at, text: input.text, recorded_by: user.id }),
    (r) => ({
      type: r.kind === 'heater_service' ? 'maintenance.heater_serviced' : 'maintenance.noted',
      actor: actorOf(user),
      subject: { type: 'maintenance_note', id: r.id },
      data: { boothId: r.booth_id, kind: r.kind, notedAt: r.noted_at.toISOString(), text: r.text },
    }),
  )
  return { id: row.id, boothId: row.booth_id, kind: row.kind, notedAt: row.noted_at.toISOString(), text: row.text }
}

// ── rules ────────────────────────────────────────────────────────────────────────────────────────

function ruleOverride(r: MaintenanceRuleRow): Partial<UpkeepRule> {
  return {
    intervalDays: r.interval_days,
    intervalBoothHours: r.interval_booth_hours,
    intervalBakeCycles: r.interval_bake_cycles,
    dpLimitPa: r.dp_limit_pa,
    trendHorizonDays: r.trend_horizon_days,
  }
}

function tasksOf(booth: BoothRow): RuleTask[] {
  return RULE_TASKS.filter((t) => t !== 'heater_service' || booth.has_heater)
}

export async function rulesOf(db: Db, boothId: number) {
  const booth = await boothOrThrow(db, boothId)
  const rows = await listRules(db, boothId)
  return tasksOf(booth).map((task) => {
    const row = rows.find((r) => r.task === task)
    return { ...effectiveRule(task, row ? ruleOverride(row) : null), custom: !!row }
  })
}

/** A manager sets a booth's rule for one task; fields left out keep the default, null switches a check off. */
export async function setRule(db: Db, user: Who, input: RuleInput) {
  const booth = await boothOrThrow(db, input.boothId)
  const task = input.task as RuleTask
  if (!tasksOf(booth).includes(task)) throw new MaintenanceError(400, 'This booth has no heater to service')
  const rule = effectiveRule(task, {
    ...(input.intervalDays !== undefined ? { intervalDays: input.intervalDays } : {}),
    ...(input.intervalBoothHours !== undefined ? { intervalBoothHours: input.intervalBoothHours } : {}),
    ...(input.intervalBakeCycles !== undefined ? { intervalBakeCycles: input.intervalBakeCycles } : {}),
    ...(input.dpLimitPa !== undefined ? { dpLimitPa: input.dpLimitPa } : {}),
    ...(input.trendHorizonDays !== undefined ? { trendHorizonDays: input.trendHorizonDays } : {}),
  })
  await recorded(
    db,
    (tx) =>
      upsertRule(tx, {
        booth_id: booth.id,
        task,
        interval_days: rule.intervalDays,
        interval_booth_hours: rule.intervalBoothHours,
        interval_bake_cycles: rule.intervalBakeCycles,
        dp_limit_pa: rule.dpLimitPa,
        trend_horizon_days: rule.trendHorizonDays,
        updated_by: user.id,
      }),
    () => ({ type: 'maintenance.rule_set', actor: actorOf(user), subject: { type: 'booth', id: booth.id }, data: { ...rule } }),
  )
  return rule
}

// ── usage and reminders ──────────────────────────────────────────────────────────────────────────

const nonIdleHours = (h: Record<BoothMode, number>) => h.spray + h.flash + h.bake + h.cool

async function filterUsage(db: Db, boothId: number, filter: 'intake' | 'exhaust', nowMs: number) {
  const last = await lastFilterChange(db, boothId, filter)
  const lastMs = last ? last.changed_at.getTime() : null
  const hours = await modeHours(db, boothId, last ? last.changed_at : null, new Date(nowMs))
  const from = Math.max(nowMs - TREND_WINDOW_DAYS * DAY_MS, lastMs ?? Number.NEGATIVE_INFINITY)
  const channel: CalibratedChannel = filter === 'intake' ? 'intakeFilterDpPa' : 'exhaustFilterDpPa'
  const points = (await filterDpHourly(db, boothId, filter, new Date(from), new Date(nowMs))).map((p) => ({
    t: p.t.getTime(),
    value: applyCalibration(boothId, channel, p.t.getTime(), p.dp) ?? p.dp,
  }))
  // Only minutes after the change are read (from ≥ the change), so a fresh filter starts a fresh line.
  const after = points
  return {
    lastDoneAtMs: lastMs,
    boothHoursSince: nonIdleHours(hours),
    bakeCyclesSince: null,
    dpPoints: after,
    latestDpPa: after.length ? after[after.length - 1]!.value : null,
  }
}

/** Every reminder of one booth, worst first. */
export async function remindersOf(db: Db, booth: BoothRow, nowMs = Date.now()) {
  await calibrationsReady(db)
  const rows = await listRules(db, booth.id)
  const rule = (task: RuleTask) => {
    const row = rows.find((r) => r.task === task)
    return effectiveRule(task, row ? ruleOverride(row) : null)
  }
  const now = new Date(nowMs)
  const out: Reminder[] = []
  for (const task of tasksOf(booth)) {
    if (task === 'intake_filter' || task === 'exhaust_filter') {
      out.push(upkeepReminder(rule(task), await filterUsage(db, booth.id, task === 'intake_filter' ? 'intake' : 'exhaust', nowMs), nowMs))
    } else if (task === 'inspection') {
      const last = await lastInspection(db, booth.id)
      out.push(upkeepReminder(rule(task), { lastDoneAtMs: last ? last.inspected_at.getTime() : null, boothHoursSince: null, bakeCyclesSince: null }, nowMs))
    } else {
      const last = await lastNoteOfKind(db, booth.id, 'heater_service')
      const since = last ? last.noted_at : null
      const [hours, cycles] = await Promise.all([modeHours(db, booth.id, since, now), countBakes(db, booth.id, since, now)])
      out.push(upkeepReminder(rule(task), { lastDoneAtMs: since ? since.getTime() : null, boothHoursSince: nonIdleHours(hours), bakeCyclesSince: cycles }, nowMs))
    }
  }
  for (const c of await latestCalibrationPerChannel(db, booth.id)) {
    if (c.next_due_at) out.push(calibrationReminder(CHANNEL_INFO[c.channel].label, c.effective_at.getTime(), c.next_due_at.getTime(), nowMs))
  }
  const order = { due: 0, soon: 1, ok: 2 }
  return out
    .sort((a, b) => order[a.status] - order[b.status])
    .map((r) => ({
      ...r,
      boothId: booth.id,
      boothName: booth.name,
      lastDoneAt: r.lastDoneAtMs === null ? null : new Date(r.lastDoneAtMs).toISOString(),
      reasons: r.reasons.map((x) => ({ ...x, dueAt: x.dueAtMs === null ? null : new Date(x.dueAtMs).toISOString() })),
    }))
}

/** Reminders of one booth or of every booth. */
export async function reminders(db: Db, boothId: number | undefined, nowMs = Date.now()) {
  const booths = boothId === undefined ? await listBooths(db) : [await boothOrThrow(db, boothId)]
  const all = []
  for (const b of booths) all.push(...(await remindersOf(db, b, nowMs)))
  return {
    at: new Date(nowMs).toISOString(),
    reminders: all,
    due: all.filter((r) => r.status === 'due').length,
    soon: all.filter((r) => r.status === 'soon').length,
  }
}

// ── counters ─────────────────────────────────────────────────────────────────────────────────────

/** Hours in each controller mode and bake cycles over [from, to) (from absent: since records began). */
export async function boothCounters(db: Db, boothId: number, from: Date | null, to: Date) {
  await boothOrThrow(db, boothId)
  const [hours, cycles, first] = await Promise.all([modeHours(db, boothId, from, to), countBakes(db, boothId, from, to), firstModeAt(db, boothId)])
  const round = (x: number) => Math.round(x * 100) / 100
  return {
    boothId,
    from: from ? from.toISOString() : null,
    to: to.toISOString(),
    /** Hour counters start at the booth's first mode message. */
    countingSince: iso(first),
    hoursByMode: Object.fromEntries(Object.entries(hours).map(([k, v]) => [k, round(v)])) as Record<BoothMode, number>,
    boothHours: round(nonIdleHours(hours)),
    bakeCycles: cycles,
  }
}

// ── history ──────────────────────────────────────────────────────────────────────────────────────

export interface HistoryItem {
  kind: 'bake' | 'filter_change' | 'calibration' | 'inspection' | 'note' | 'heater_service'
  id: number
  at: string
  title: string
  detail: string
  by: string | null
  ok: boolean | null
  link: string | null
}

const one = (x: number | null) => (x === null ? '—' : String(Math.round(x * 10) / 10))

/** A booth's upkeep history, newest first: bakes, filter changes, calibrations, inspections, notes. */
export async function upkeepHistory(db: Db, boothId: number, f: { from?: Date; to?: Date; limit: number }) {
  const booth = await boothOrThrow(db, boothId)
  const [bakes, filters, cals, inspections, notes] = await Promise.all([
    listBakes(db, { boothId, from: f.from, to: f.to, limit: f.limit }),
    listFilterChanges(db, boothId, f),
    listCalibrationsInRange(db, boothId, f),
    listInspections(db, boothId, f),
    listNotes(db, boothId, f),
  ])
  const items: HistoryItem[] = []
  for (const b of bakes) {
    const verdict = b.result?.judgement.verdict
    items.push({
      kind: 'bake',
      id: b.id,
      at: b.started_at.toISOString(),
      title: `Bake ${b.id} (${b.state.replace('_', ' ')})`,
      detail: [b.ended_at ? `${Math.round((b.ended_at.getTime() - b.started_at.getTime()) / 60_000)} min` : 'running', verdict ? `result: ${verdict}` : null, b.dismiss_reason ? `dismissed: ${b.dismiss_reason}` : null]
        .filter(Boolean)
        .join(' · '),
      by: b.signed_off_by_name ?? b.confirmed_by_name ?? b.started_by_name,
      ok: verdict === 'pass' ? true : verdict === 'fail' ? false : null,
      link: `/bakes/${b.id}`,
    })
  }
  for (const r of filters) {
    items.push({
      kind: 'filter_change',
      id: r.id,
      at: r.changed_at.toISOString(),
      title: `${r.filter === 'intake' ? 'Intake' : 'Exhaust'} filter changed`,
      detail: `Pressure drop ${one(r.dp_before_pa)} → ${one(r.dp_after_pa)} Pa${r.notes ? ` · ${r.notes}` : ''}`,
      by: r.recorded_by_name,
      ok: null,
      link: null,
    })
  }
  for (const r of cals) {
    const info = CHANNEL_INFO[r.channel]
    items.push({
      kind: 'calibration',
      id: r.id,
      at: r.effective_at.toISOString(),
      title: `${info.label} calibrated`,
      detail: `Reference ${one(r.reference_value)} ${info.unit}, sensor ${one(r.sensor_value)} ${info.unit} → offset ${r.offset_value >= 0 ? '+' : ''}${Math.round(r.offset_value * 100) / 100} ${info.unit}${r.instrument ? ` · ${r.instrument}` : ''}${r.next_due_at ? ` · next due ${r.next_due_at.toISOString().slice(0, 10)}` : ''}`,
      by: r.recorded_by_name,
      ok: null,
      link: null,
    })
  }
  for (const r of inspections) {
    const failed = r.items.filter((i) => !i.ok).map((i) => INSPECTION_ITEMS.find((x) => x.key === i.key)?.label ?? i.key)
    items.push({
      kind: 'inspection',
      id: r.id,
      at: r.inspected_at.toISOString(),
      title: 'Booth inspection',
      detail: (failed.length ? `Needs attention: ${failed.join(', ')}` : 'All items in order') + (r.notes ? ` · ${r.notes}` : ''),
      by: r.recorded_by_name,
      ok: r.all_ok,
      link: null,
    })
  }
  for (const r of notes) {
    items.push({
      kind: r.kind === 'heater_service' ? 'heater_service' : 'note',
      id: r.id,
      at: r.noted_at.toISOString(),
      title: r.kind === 'heater_service' ? 'Heater serviced' : 'Note',
      detail: r.text,
      by: r.recorded_by_name,
      ok: null,
      link: null,
    })
  }
  items.sort((a, b) => Date.parse(b.at) - Date.parse(a.at) || a.kind.localeCompare(b.kind) || b.id - a.id)
  return { boothId: booth.id, boothName: booth.name, items: items.slice(0, f.limit) }
}
