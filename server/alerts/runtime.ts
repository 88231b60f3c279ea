// The watches at run time: one in-memory evaluator per booth, fed from the ingest hot path (no query per reading).
//
//   onAccepted(row) → evaluator.onReading → events queued      (synchronous, O(rules), never throws)
//   every second:  evaluator.onTick for silence / bake / CUSUM flush → drain the queue to the database, and
//                  with the alert changes, the booth's evaluator snapshot in the same transaction (so a restart
//                  never finds an open engine state without its alert, or the reverse)
//   every 30 s:    snapshots of booths whose state moved; watch-set versions compared (another instance's edit)
//
// Timers run in device time: "now" for a booth is the wall clock minus how late its last reading arrived, so a
// device clock that runs a little behind, or a replayed backlog, does not look like sensor silence.

import type { Kysely } from 'kysely'
import {
  createBoothEvaluator,
  isBoothMode,
  type BoothEvaluator,
  type BoothEvaluatorSnapshot,
  type BoothMode,
  type WatchEvent,
  type WatchReading,
} from '#shared/watch'
import type { Database } from '../db/database'
import type { AlertRow } from '../db/tables/alerts'
import {
  findAlertsByIds,
  insertOpenAlert,
  noteClearAfterManual,
  resolveActiveOnClear,
  resolveForRemovedWatches,
} from '../repositories/alerts'
import { findBooth, listBooths } from '../repositories/booths'
import { findWatchSet, listWatchSetVersions, listWatchSets, listWatchStates, saveWatchState } from '../repositories/watches'
import type { ReadingRow } from '../telemetry/reading-row'
import { ApplicationWindowSchema, ApplicationWindowWatch, type AppWindowEvent, type ApplicationWindowLimits } from './application-window'
import { publishAlertChange, type AlertChange } from './bus'
import { severityOf, unitOf, type AlertKind } from './kinds'
import { toAlertView } from './view'
import { defaultWatches, fromStored, type BoothWatch } from './watch-set'

export interface QueuedOpenClose {
  type: 'open' | 'clear'
  boothId: number
  ruleId: string
  kind: AlertKind
  label: string | null
  channel: string | null
  at: number
  value: number | null
  limit: number | null
  peak: number | null
  message: string
  recipients: string[]
}

export interface QueuedRemoval {
  type: 'removed'
  boothId: number
  ruleIds: string[]
}

export type QueuedEvent = QueuedOpenClose | QueuedRemoval

interface BoothState {
  boothId: number
  /** watch_sets.version, or null when the booth uses the shop defaults. */
  version: number | null
  /** Set for a booth first seen after start: it runs the downdraft defaults until its kind and set are loaded. */
  provisional?: true
  watches: BoothWatch[]
  byId: Map<string, BoothWatch>
  evaluator: BoothEvaluator
  app: ApplicationWindowWatch
  mode: BoothMode | null
  /** receivedMs − tsMs of the last reading. */
  offsetMs: number
  /** JSON of the state last written, to skip unchanged saves. */
  savedJson: string | null
}

export interface InitialBooth {
  boothId: number
  mode: BoothMode | null
  /** Last reading's device time and arrival, if the booth ever reported. */
  lastReading: { tsMs: number; receivedMs: number } | null
}

export interface AlertRuntimeOptions {
  tickMs?: number
  snapshotEveryMs?: number
  versionCheckEveryMs?: number
  /** Called after alert changes were committed (the notifier wakes up). */
  onCommitted?: (changes: AlertChange[]) => void
  initialBooths?: () => Promise<InitialBooth[]>
}

const MAX_QUEUE = 50_000
const MAX_EVENT_ATTEMPTS = 5

function stateJson(b: BoothState): { snapshot: BoothEvaluatorSnapshot; app: unknown; json: string } {
  const snapshot = b.evaluator.snapshot()
  const app = b.app.current ? b.app.snapshot() : null
  return { snapshot, app, json: JSON.stringify([snapshot, app]) }
}

const toSeconds = (kind: string, v: number | null) => (kind === 'sensor_silence' && v !== null ? v / 1000 : v)

export class AlertRuntime {
  private readonly booths = new Map<number, BoothState>()
  private queue: { event: QueuedEvent; attempts: number }[] = []
  private dropped = 0
  private timer: NodeJS.Timeout | undefined
  private running: Promise<void> | null = null
  private lastSnapshotAt = 0
  private lastVersionCheckAt = 0
  private saveSoon = false
  private stopped = false
  private readonly tickMs: number
  private readonly snapshotEveryMs: number
  private readonly versionCheckEveryMs: number

  constructor(
    private readonly db: Kysely<Database>,
    private readonly opts: AlertRuntimeOptions = {},
  ) {
    this.tickMs = opts.tickMs ?? 1_000
    this.snapshotEveryMs = opts.snapshotEveryMs ?? 30_000
    this.versionCheckEveryMs = opts.versionCheckEveryMs ?? 30_000
  }

  // ---- start / stop

  async start(): Promise<void> {
    const [booths, sets, states, initial] = await Promise.all([
      listBooths(this.db),
      listWatchSets(this.db),
      listWatchStates(this.db),
      this.opts.initialBooths?.() ?? Promise.resolve([]),
    ])
    for (const b of booths) {
      const set = sets.find((s) => s.booth_id === b.id)
      const st = states.find((s) => s.booth_id === b.id)
      const init = initial.find((i) => i.boothId === b.id)
      const watches = set ? fromStored(set.rules).watches : defaultWatches(b.kind)
      const state = this.build(b.id, watches, set?.version ?? null, init ?? null)
      if (st) {
        state.evaluator.restore(st.snapshot)
        state.app.restore(st.application_window)
        state.savedJson = stateJson(state).json
      }
      this.booths.set(b.id, state)
    }
    for (const [boothId, limits] of pendingWindows) this.setApplicationWindow(boothId, limits)
    pendingWindows.clear()
    this.lastSnapshotAt = Date.now()
    this.lastVersionCheckAt = Date.now()
    this.timer = setInterval(() => void this.runOnce(), this.tickMs)
    this.timer.unref?.()
  }

  /** Final drain and snapshots; the database must still be open. */
  async stop(): Promise<void> {
    if (this.stopped) return
    this.stopped = true
    if (this.timer) clearInterval(this.timer)
    await this.running
    this.tickAll()
    await this.drain()
    await this.saveSnapshots()
  }

  // ---- hot path

  onAccepted(row: ReadingRow): void {
    const b = this.ensure(row.boothId)
    b.offsetMs = row.receivedMs - row.tsMs
    const surface = row.panelTempC ?? row.airTempC
    const margin = surface !== null && row.dewPointC !== null ? surface - row.dewPointC : null
    const reading: WatchReading = {
      t: row.tsMs,
      airTempC: row.airTempC,
      rhPct: row.rhPct,
      panelTempC: row.panelTempC,
      airflowMps: row.airflowMps,
      boothDpPa: row.boothDpPa,
      intakeFilterDpPa: row.intakeFilterDpPa,
      exhaustFilterDpPa: row.exhaustFilterDpPa,
      dewPointMarginC: margin,
    }
    if (b.mode) reading.mode = b.mode
    const events = b.evaluator.onReading(reading)
    if (events.length) this.enqueueWatchEvents(b, events)
    const app = b.app.reading(reading, b.mode)
    if (app.length) this.enqueueAppEvents(b, app)
  }

  onMode(boothId: number, mode: string): void {
    if (isBoothMode(mode)) this.ensure(boothId).mode = mode
  }

  /** A booth added since start gets the downdraft defaults now, and its kind's defaults or its own set at the
   * next version check. */
  private ensure(boothId: number): BoothState {
    let b = this.booths.get(boothId)
    if (!b) {
      b = { ...this.build(boothId, defaultWatches(), null, null), provisional: true }
      this.booths.set(boothId, b)
      this.lastVersionCheckAt = 0
    }
    return b
  }

  // ---- for the jobs code

  setApplicationWindow(boothId: number, limits: ApplicationWindowLimits | null): void {
    const b = this.booths.get(boothId)
    if (!b) {
      pendingWindows.set(boothId, limits)
      return
    }
    const events = b.app.set(limits, Date.now() - b.offsetMs)
    if (events.length) this.enqueueAppEvents(b, events)
    this.saveSoon = true
  }

  applicationWindow(boothId: number): ApplicationWindowLimits | null {
    return this.booths.get(boothId)?.app.current ?? null
  }

  /** Rebuilds a booth's evaluator from its stored watch set, keeping the state of watches that stay. */
  async reloadBooth(boothId: number): Promise<void> {
    const [set, booth] = await Promise.all([findWatchSet(this.db, boothId), findBooth(this.db, boothId)])
    const watches = set ? fromStored(set.rules).watches : defaultWatches(booth?.kind)
    this.replaceWatches(boothId, watches, set?.version ?? null)
  }

  // ---- the loop

  /** One round: ticks, drain, and the periodic work. Rounds never overlap. */
  runOnce(): Promise<void> {
    if (this.running) return this.running
    this.running = (async () => {
      try {
        this.tickAll()
        await this.drain()
        const now = Date.now()
        if (this.saveSoon || now - this.lastSnapshotAt >= this.snapshotEveryMs) {
          this.saveSoon = false
          this.lastSnapshotAt = now
          await this.saveSnapshots()
        }
        if (now - this.lastVersionCheckAt >= this.versionCheckEveryMs) {
          this.lastVersionCheckAt = now
          await this.checkVersions()
        }
      } catch (e) {
        console.warn('[alerts] round failed:', e instanceof Error ? e.message : e)
      } finally {
        this.running = null
      }
    })()
    return this.running
  }

  private lastFailureLog = 0

  /** At most one warning every 10 s while the database is away. */
  private logFailure(message: string): void {
    const now = Date.now()
    if (now - this.lastFailureLog < 10_000) return
    this.lastFailureLog = now
    console.warn(`[alerts] ${message}`)
  }

  stats() {
    return { booths: this.booths.size, queued: this.queue.length, dropped: this.dropped }
  }

  // ---- internals

  private build(boothId: number, watches: BoothWatch[], version: number | null, init: InitialBooth | null): BoothState {
    const rules = watches.map((w) => w.rule)
    // Silence is armed from the last reading the booth ever sent: a booth that never reported is not "silent",
    // it is not set up yet.
    const startMs = init?.lastReading?.tsMs
    const evaluator = createBoothEvaluator(rules, { ...(startMs !== undefined && { startMs }), initialMode: init?.mode ?? null })
    return {
      boothId,
      version,
      watches,
      byId: new Map(watches.map((w) => [w.rule.id, w])),
      evaluator,
      app: new ApplicationWindowWatch(),
      mode: init?.mode ?? null,
      offsetMs: init?.lastReading ? init.lastReading.receivedMs - init.lastReading.tsMs : 0,
      savedJson: null,
    }
  }

  private replaceWatches(boothId: number, watches: BoothWatch[], version: number | null): void {
    const old = this.booths.get(boothId)
    const next = this.build(boothId, watches, version, null)
    if (old) {
      next.mode = old.mode
      next.offsetMs = old.offsetMs
      next.app = old.app
      next.savedJson = null
      const snap = old.evaluator.snapshot()
      const same = (a: BoothWatch | undefined, b: BoothWatch | undefined) =>
        !!a && !!b && a.rule.kind === b.rule.kind && a.rule.channel === b.rule.channel && a.rule.enabled && b.rule.enabled
      const removed: string[] = []
      for (const w of old.watches) {
        if (!w.rule.enabled) continue
        if (!same(w, next.byId.get(w.rule.id))) {
          removed.push(w.rule.id)
          delete snap.rules[w.rule.id]
        }
      }
      next.evaluator.restore(snap)
      if (removed.length) this.push({ type: 'removed', boothId, ruleIds: removed })
    }
    this.booths.set(boothId, next)
    this.saveSoon = true
  }

  private tickAll(): void {
    const now = Date.now()
    for (const b of this.booths.values()) {
      const events = b.evaluator.onTick(now - b.offsetMs)
      if (events.length) this.enqueueWatchEvents(b, events)
    }
  }

  private enqueueWatchEvents(b: BoothState, events: readonly WatchEvent[]): void {
    for (const e of events) {
      const w = b.byId.get(e.ruleId)
      this.push({
        type: e.type,
        boothId: b.boothId,
        ruleId: e.ruleId,
        kind: e.kind,
        label: w?.rule.label ?? null,
        channel: w?.rule.channel ?? null,
        at: e.at,
        value: toSeconds(e.kind, e.value),
        limit: toSeconds(e.kind, e.limit),
        peak: toSeconds(e.kind, e.peak),
        message: e.message,
        recipients: w?.recipients ?? [],
      })
    }
  }

  private enqueueAppEvents(b: BoothState, events: readonly AppWindowEvent[]): void {
    for (const e of events) {
      this.push({ ...e, boothId: b.boothId, label: null, recipients: [] })
    }
  }

  private push(event: QueuedEvent): void {
    this.queue.push({ event, attempts: 0 })
    if (this.queue.length > MAX_QUEUE) {
      this.queue.shift()
      this.dropped++
    }
  }

  private async drain(): Promise<void> {
    if (!this.queue.length) return
    const batch = this.queue
    this.queue = []
    const byBooth = new Map<number, { event: QueuedEvent; attempts: number }[]>()
    for (const item of batch) {
      const list = byBooth.get(item.event.boothId)
      if (list) list.push(item)
      else byBooth.set(item.event.boothId, [item])
    }
    const changed: { id: number; type: AlertChange['type'] }[] = []
    const retry: { event: QueuedEvent; attempts: number }[] = []
    for (const [boothId, items] of byBooth) {
      const b = this.booths.get(boothId)
      // Taken now, before any await: exactly the state these events came from (none newer is queued yet).
      const st = b && !this.queue.some((q) => q.event.boothId === boothId) ? stateJson(b) : null
      try {
        const rows = await this.db.transaction().execute(async (tx) => {
          const out: { row: AlertRow; type: AlertChange['type'] }[] = []
          for (const { event } of items) out.push(...(await applyEvent(tx, event)))
          if (st) await saveWatchState(tx, boothId, st.snapshot, st.app)
          return out
        })
        if (b && st) b.savedJson = st.json
        for (const r of rows) changed.push({ id: r.row.id, type: r.type })
      } catch (e) {
        // The database being away is retried for as long as it takes (the queue is bounded); an error in the
        // data itself (SQLSTATE class 22 / 23, e.g. a booth that no longer exists) is given a few tries only.
        const code = (e as { code?: unknown }).code
        const dataError = typeof code === 'string' && (code.startsWith('22') || code.startsWith('23'))
        this.logFailure(`could not store alert changes of booth ${boothId}: ${e instanceof Error ? e.message : String(e)}`)
        for (const item of items) {
          const attempts = dataError ? item.attempts + 1 : item.attempts
          if (attempts < MAX_EVENT_ATTEMPTS) retry.push({ event: item.event, attempts })
          else this.dropped++
        }
      }
    }
    if (retry.length) this.queue = retry.concat(this.queue)
    if (!changed.length) return
    const details = await findAlertsByIds(this.db, [...new Set(changed.map((c) => c.id))]).catch(() => [])
    const now = Date.now()
    const changes: AlertChange[] = []
    for (const c of changed) {
      const d = details.find((x) => x.id === c.id)
      if (d) changes.push({ type: c.type, alert: toAlertView(d, now) })
    }
    for (const c of changes) publishAlertChange(c)
    this.opts.onCommitted?.(changes)
  }

  private async saveSnapshots(): Promise<void> {
    for (const b of this.booths.values()) {
      if (this.queue.some((q) => q.event.boothId === b.boothId)) continue
      const st = stateJson(b)
      if (st.json === b.savedJson) continue
      try {
        await saveWatchState(this.db, b.boothId, st.snapshot, st.app)
        b.savedJson = st.json
      } catch (e) {
        console.warn(`[alerts] snapshot of booth ${b.boothId} not saved:`, e instanceof Error ? e.message : e)
      }
    }
  }

  private async checkVersions(): Promise<void> {
    const versions = await listWatchSetVersions(this.db)
    const ids = new Set<number>([...this.booths.keys(), ...versions.map((v) => v.booth_id)])
    for (const id of ids) {
      const stored = versions.find((v) => v.booth_id === id)?.version ?? null
      const b = this.booths.get(id)
      if (!b || b.provisional || b.version !== stored) await this.reloadBooth(id)
    }
  }
}

async function applyEvent(tx: Kysely<Database>, e: QueuedEvent): Promise<{ row: AlertRow; type: AlertChange['type'] }[]> {
  const now = new Date()
  if (e.type === 'removed') {
    const rows = await resolveForRemovedWatches(tx, e.boothId, e.ruleIds, now)
    return rows.map((row) => ({ row, type: 'resolved' as const }))
  }
  if (e.type === 'open') {
    const row = await insertOpenAlert(tx, {
      booth_id: e.boothId,
      rule_id: e.ruleId,
      kind: e.kind,
      label: e.label,
      severity: severityOf(e.kind),
      channel: e.channel,
      unit: unitOf(e.kind, e.channel),
      message: e.message,
      value: finite(e.value),
      limit_value: finite(e.limit),
      peak: finite(e.peak),
      opened_at: new Date(e.at),
      recipients: JSON.stringify(e.recipients),
      notify_due_at: now,
      created_at: now,
      updated_at: now,
    })
    return row ? [{ row, type: 'opened' }] : []
  }
  const patch = { at: new Date(e.at), value: finite(e.value), peak: finite(e.peak), message: e.message, now }
  const row = await resolveActiveOnClear(tx, e.boothId, e.ruleId, patch)
  if (row) return [{ row, type: 'cleared' }]
  const late = await noteClearAfterManual(tx, e.boothId, e.ruleId, patch)
  return late ? [{ row: late, type: 'updated' }] : []
}

function finite(v: number | null): number | null {
  return v !== null && Number.isFinite(v) ? v : null
}

// ---- the process-wide runtime

let current: AlertRuntime | undefined
const pendingWindows = new Map<number, ApplicationWindowLimits | null>()

export function alertRuntime(): AlertRuntime | undefined {
  return current
}

export function setAlertRuntime(r: AlertRuntime | undefined): void {
  current = r
}

/**
 * For the jobs code: while a job step is active in a booth, watch the product's application window (TDS limits);
 * null when the step ends. Safe to call before the alert runtime has started (applied when it does). Throws an
 * error with statusCode 400 on malformed limits.
 */
export function setApplicationWindow(boothId: number, limits: ApplicationWindowLimits | null): void {
  let clean: ApplicationWindowLimits | null = null
  if (limits !== null) {
    const parsed = ApplicationWindowSchema.safeParse(limits)
    if (!parsed.success) {
      throw Object.assign(new Error(`Invalid application window: ${parsed.error.issues.map((i) => i.message).join('; ')}`), { statusCode: 400 })
    }
    clean = parsed.data
  }
  if (current) current.setApplicationWindow(boothId, clean)
  else pendingWindows.set(boothId, clean)
}
