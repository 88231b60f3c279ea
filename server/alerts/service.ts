// Alert and watch actions the routes call: list, acknowledge, resolve, summary, and watch sets per booth.
// Actions by people are recorded in the event log in the same transaction.

import type { Kysely } from 'kysely'
import { defaultWatchRules, WATCH_DEFAULTS, WATCH_KIND_LABELS, WATCH_KINDS } from '#shared/watch'
import type { Database } from '../db/database'
import { actorOf, recorded } from '../domain/event-log'
import {
  acknowledgeAlert,
  countActiveAlerts,
  findAlert,
  listAlerts,
  resolveAlertByHand,
  type AlertFilter,
} from '../repositories/alerts'
import { findBooth, listBooths } from '../repositories/booths'
import { listMailForAlert } from '../repositories/outbox'
import { deleteWatchSet, findWatchSet, listWatchSets, saveWatchSet } from '../repositories/watches'
import { publishAlertChange } from './bus'
import { alertRuntime } from './runtime'
import { toAlertView, type AlertView } from './view'
import { defaultWatches, fromEntries, fromStored, toEntries, toStored, type WatchEntry } from './watch-set'

export class AlertError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
  ) {
    super(message)
  }
}

type Db = Kysely<Database>
type Who = { id: number; name: string; role: string }

// ---- alerts

export async function listAlertViews(db: Db, filter: AlertFilter): Promise<{ alerts: AlertView[]; nextBefore: number | null }> {
  const rows = await listAlerts(db, { ...filter, limit: filter.limit + 1 })
  const more = rows.length > filter.limit
  const page = more ? rows.slice(0, filter.limit) : rows
  const now = Date.now()
  return { alerts: page.map((r) => toAlertView(r, now)), nextBefore: more ? (page[page.length - 1]?.id ?? null) : null }
}

export async function alertDetail(db: Db, id: number) {
  const row = await findAlert(db, id)
  if (!row) throw new AlertError(404, 'No such alert')
  const mails = await listMailForAlert(db, id)
  return {
    alert: toAlertView(row),
    mails: mails.map((m) => ({
      id: m.id,
      kind: m.kind,
      recipients: m.recipients,
      subject: m.subject,
      state: m.state,
      attempts: m.attempts,
      lastError: m.last_error,
      createdAt: m.created_at.toISOString(),
      sentAt: m.sent_at?.toISOString() ?? null,
    })),
  }
}

export async function acknowledge(db: Db, who: Who, id: number, note: string | null): Promise<AlertView> {
  const before = await findAlert(db, id)
  if (!before) throw new AlertError(404, 'No such alert')
  if (before.state !== 'open') {
    throw new AlertError(409, before.state === 'acknowledged' ? 'This alert is already acknowledged' : 'This alert is already resolved')
  }
  const row = await recorded(
    db,
    async (tx) => {
      const r = await acknowledgeAlert(tx, id, who.id, note, new Date())
      if (!r) throw new AlertError(409, 'This alert changed meanwhile; reload and try again')
      return r
    },
    (r) => ({
      type: 'alert.acknowledged',
      actor: actorOf(who),
      subject: { type: 'alert', id: r.id },
      data: { boothId: r.booth_id, ruleId: r.rule_id, kind: r.kind, note },
    }),
  )
  return publish('acknowledged', row.id, db)
}

export async function resolveByHand(db: Db, who: Who, id: number, note: string): Promise<AlertView> {
  const before = await findAlert(db, id)
  if (!before) throw new AlertError(404, 'No such alert')
  if (before.state === 'resolved') throw new AlertError(409, 'This alert is already resolved')
  const row = await recorded(
    db,
    async (tx) => {
      const r = await resolveAlertByHand(tx, id, who.id, note, new Date())
      if (!r) throw new AlertError(409, 'This alert changed meanwhile; reload and try again')
      return r
    },
    (r) => ({
      type: 'alert.resolved',
      actor: actorOf(who),
      subject: { type: 'alert', id: r.id },
      data: { boothId: r.booth_id, ruleId: r.rule_id, kind: r.kind, note, conditionCleared: r.cleared_at !== null },
    }),
  )
  return publish('resolved', row.id, db)
}

async function publish(type: 'acknowledged' | 'resolved', id: number, db: Db): Promise<AlertView> {
  const row = await findAlert(db, id)
  if (!row) throw new AlertError(404, 'No such alert')
  const view = toAlertView(row)
  publishAlertChange({ type, alert: view })
  return view
}

export interface BoothAlertCounts {
  boothId: number
  /** Not yet acknowledged. */
  open: number
  acknowledged: number
  /** open + acknowledged. */
  active: number
  /** Active alerts of critical kinds. */
  critical: number
}

/** Active (not resolved) alerts per booth, for dashboard badges. Every booth is listed, with zeros when quiet. */
export async function alertSummary(db: Db): Promise<{ booths: BoothAlertCounts[]; total: Omit<BoothAlertCounts, 'boothId'> }> {
  const [booths, counts] = await Promise.all([listBooths(db), countActiveAlerts(db)])
  const by = new Map<number, BoothAlertCounts>(booths.map((b) => [b.id, { boothId: b.id, open: 0, acknowledged: 0, active: 0, critical: 0 }]))
  for (const c of counts) {
    const e = by.get(c.booth_id) ?? { boothId: c.booth_id, open: 0, acknowledged: 0, active: 0, critical: 0 }
    const n = Number(c.n)
    if (c.state === 'open') e.open += n
    else if (c.state === 'acknowledged') e.acknowledged += n
    e.active += n
    if (c.severity === 'critical') e.critical += n
    by.set(c.booth_id, e)
  }
  const list = [...by.values()]
  const total = list.reduce(
    (t, e) => ({ open: t.open + e.open, acknowledged: t.acknowledged + e.acknowledged, active: t.active + e.active, critical: t.critical + e.critical }),
    { open: 0, acknowledged: 0, active: 0, critical: 0 },
  )
  return { booths: list, total }
}

// ---- watches

/** What the watch editor needs to explain the defaults. */
export function watchCatalogue() {
  return {
    kinds: WATCH_KINDS.map((k) => ({ kind: k, label: WATCH_KIND_LABELS[k] })),
    defaults: toEntries(defaultWatches()),
    shopDefaults: WATCH_DEFAULTS,
  }
}

export async function boothWatches(db: Db, boothId: number) {
  const booth = await findBooth(db, boothId)
  if (!booth) throw new AlertError(404, 'No such booth')
  const set = await findWatchSet(db, boothId)
  const watches = set ? fromStored(set.rules).watches : defaultWatches(booth.kind)
  return {
    booth: { id: booth.id, name: booth.name, slug: booth.slug, hasHeater: booth.has_heater },
    source: set ? ('booth' as const) : ('defaults' as const),
    version: set?.version ?? null,
    updatedAt: set?.updated_at.toISOString() ?? null,
    updatedBy: set?.updated_by_name ?? null,
    watches: toEntries(watches),
    applicationWindow: alertRuntime()?.applicationWindow(boothId) ?? null,
  }
}

export async function allBoothWatches(db: Db) {
  const [booths, sets] = await Promise.all([listBooths(db), listWatchSets(db)])
  return booths.map((b) => {
    const defaultsCount = defaultWatchRules(b.kind).length
    const set = sets.find((s) => s.booth_id === b.id)
    const watches = set ? fromStored(set.rules).watches : null
    return {
      boothId: b.id,
      boothName: b.name,
      source: set ? ('booth' as const) : ('defaults' as const),
      count: watches ? watches.length : defaultsCount,
      enabled: watches ? watches.filter((w) => w.rule.enabled).length : defaultsCount,
      updatedAt: set?.updated_at.toISOString() ?? null,
      updatedBy: set?.updated_by_name ?? null,
    }
  })
}

export async function replaceBoothWatches(db: Db, who: Who, boothId: number, entries: readonly WatchEntry[]) {
  const booth = await findBooth(db, boothId)
  if (!booth) throw new AlertError(404, 'No such booth')
  const watches = fromEntries(entries)
  const stored = toStored(watches)
  await recorded(
    db,
    (tx) => saveWatchSet(tx, boothId, stored, who.id),
    (r) => ({
      type: 'watches.updated',
      actor: actorOf(who),
      subject: { type: 'booth', id: boothId },
      data: { version: r.version, watches: stored.map((w) => ({ ...(w.rule as Record<string, unknown>), recipients: w.recipients })) },
    }),
  )
  await alertRuntime()?.reloadBooth(boothId)
  return boothWatches(db, boothId)
}

export async function resetBoothWatches(db: Db, who: Who, boothId: number) {
  const booth = await findBooth(db, boothId)
  if (!booth) throw new AlertError(404, 'No such booth')
  await recorded(
    db,
    (tx) => deleteWatchSet(tx, boothId),
    (removed) => ({
      type: 'watches.reset',
      actor: actorOf(who),
      subject: { type: 'booth', id: boothId },
      data: { hadOwnSet: removed },
    }),
  )
  await alertRuntime()?.reloadBooth(boothId)
  return boothWatches(db, boothId)
}
