import type { Kysely } from 'kysely'
import { createOnsetState, DEFAULT_ONSET_RULE, markBaking, stepOnset, type OnsetRule, type OnsetState } from '#shared/bake/onset'
import type { Database } from '../db/database'
import type { TelemetryHooks } from '../telemetry/runtime'
import type { BoothModeValue } from '../telemetry/wire'
import { closeRunningBake, listRunningBakes, openDetectedBake } from './bakes'

// Opens and ends bakes from telemetry, without a person:
//   - the controller's mode: → bake opens a bake ('detected', to be confirmed by a tech) at the mode's time;
//     → idle / spray / flash ends the running bake (cool is part of the bake cycle, so it does not);
//   - heater + a rising panel temperature (shared/bake/onset.ts), for booths whose controller has not reported
//     a mode in the last 12 h.
// The hooks run on the ingest hot path: O(1), no query, no await, never throw. They only queue work; a timer
// drains the queue one item at a time against the database.

type Work = { kind: 'open' | 'close'; boothId: number; atMs: number; source: 'mode' | 'heater' }

/** A booth that reported a mode this recently is driven by its modes; the heater rule stays off for it. */
export const MODE_DRIVEN_MS = 12 * 3_600_000
const QUEUE_MAX = 10_000
const ENDS_BAKE: readonly BoothModeValue[] = ['idle', 'spray', 'flash']

export class BakeDetector {
  private readonly queue: Work[] = []
  private readonly onset = new Map<number, OnsetState>()
  private readonly lastModeAt = new Map<number, number>()
  private readonly lastMode = new Map<number, BoothModeValue>()
  private timer: ReturnType<typeof setInterval> | undefined
  private draining: Promise<void> | undefined
  /** Work dropped because the queue was full (the database away for a long time). */
  dropped = 0
  processed = 0
  failed = 0

  constructor(
    private readonly db: Kysely<Database>,
    private readonly rule: OnsetRule = DEFAULT_ONSET_RULE,
    private readonly intervalMs = 1_000,
  ) {}

  /** Running bakes and the last mode of each booth, so a restart carries on where it was. */
  async init(): Promise<void> {
    for (const b of await listRunningBakes(this.db)) this.onset.set(b.booth_id, markBaking(createOnsetState(), b.started_at.getTime()))
    const modes = await this.db.selectFrom('booth_modes').distinctOn('booth_id').select(['booth_id', 'ts', 'mode']).orderBy('booth_id').orderBy('ts', 'desc').execute()
    for (const m of modes) {
      this.lastModeAt.set(m.booth_id, m.ts.getTime())
      this.lastMode.set(m.booth_id, m.mode)
    }
  }

  start(): void {
    this.timer ??= setInterval(() => void this.drain(), this.intervalMs)
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer)
    this.timer = undefined
    await this.drain()
  }

  hooks(): TelemetryHooks {
    return {
      onMode: (boothId, mode, tsMs) => {
        try {
          this.mode(boothId, mode, tsMs)
        } catch {
          // never throw on the ingest path
        }
      },
      onAccepted: (row) => {
        try {
          this.reading(row.boothId, row.tsMs, row.heaterOn, row.panelTempC, row.airTempC)
        } catch {
          // never throw on the ingest path
        }
      },
    }
  }

  mode(boothId: number, mode: BoothModeValue, tsMs: number): void {
    const prev = this.lastMode.get(boothId)
    this.lastModeAt.set(boothId, Math.max(this.lastModeAt.get(boothId) ?? 0, tsMs))
    this.lastMode.set(boothId, mode)
    if (prev === mode) return // a repeated (retained / periodic) mode message changes nothing
    if (mode === 'bake') {
      // Straight from one bake's cool into the next bake: the first one ends where the second starts.
      if (prev === 'cool') this.push({ kind: 'close', boothId, atMs: tsMs, source: 'mode' })
      this.push({ kind: 'open', boothId, atMs: tsMs, source: 'mode' })
    }
    else if (ENDS_BAKE.includes(mode)) this.push({ kind: 'close', boothId, atMs: tsMs, source: 'mode' })
  }

  reading(boothId: number, tsMs: number, heaterOn: boolean | null, panelTempC: number | null, airTempC: number | null): void {
    const modeAt = this.lastModeAt.get(boothId)
    if (modeAt !== undefined && tsMs - modeAt < MODE_DRIVEN_MS) return
    if (heaterOn === null && !this.onset.has(boothId)) return
    const step = stepOnset(this.rule, this.onset.get(boothId) ?? createOnsetState(), { t: tsMs, heaterOn, panelTempC, airTempC })
    this.onset.set(boothId, step.state)
    if (step.event) this.push({ kind: step.event.type === 'start' ? 'open' : 'close', boothId, atMs: step.event.at, source: 'heater' })
  }

  private push(w: Work): void {
    if (this.queue.length >= QUEUE_MAX) {
      this.queue.shift()
      this.dropped++
    }
    this.queue.push(w)
  }

  /** Works through the queue in order (one at a time, so an open and its close never race). */
  drain(): Promise<void> {
    // With nothing queued the async body below would finish, and clear `draining`, before `??=` stores it: a
    // settled promise would then stay there for good and every later drain would do nothing.
    if (!this.draining && !this.queue.length) return Promise.resolve()
    this.draining ??= (async () => {
      try {
        while (this.queue.length) {
          const w = this.queue.shift()!
          try {
            if (w.kind === 'open') await openDetectedBake(this.db, w.boothId, w.atMs, w.source)
            else await closeRunningBake(this.db, w.boothId, w.atMs, w.source)
            this.processed++
          } catch (e) {
            this.failed++
            console.warn(`[bakes] ${w.kind} for booth ${w.boothId} failed:`, e instanceof Error ? e.message : e)
          }
        }
      } finally {
        this.draining = undefined
      }
    })()
    return this.draining
  }

  pending(): number {
    return this.queue.length
  }
}
