import type { Kysely } from 'kysely'
import {
  applicationWindowCheck,
  condensationGuard,
  DEFAULT_MAX_HOLD_MS,
  flashProgress,
  potLife,
  reducerAdvice,
  type EstimateReason,
  type Sample,
} from '#shared/cure'
import { applicationLimits, reducerBands, toFlashSpec, toPotLifeSpec, type FlashStage } from '#shared/specs/engine-inputs'
import type { Database, SiteUnits } from '../db/database'
import type { Coat, Job, JobStep, Mix } from '../db/tables/jobs'
import { setApplicationWindow } from '../alerts'
import { listCoatsOfJob, findOpenCoatOfBooth } from '../repositories/coats'
import { boothWithUnits, findJob, listOpenJobsOfBooth, listSteps } from '../repositories/jobs'
import { listOpenMixesOfBooth } from '../repositories/mixes'
import { listUsers } from '../repositories/users'
import { loadLatestStates } from '../telemetry/latest'
import type { LiveBoothState, LiveReading } from '../telemetry/live-hub'
import { telemetry } from '../telemetry/runtime'
import { STALE_AFTER_MS } from './booths'
import { DEW_POINT_MIN_MARGIN_C, latestCoat, nextCoatOf, readingAt, samplesOf } from './coats'
import { loadRevisions, type RevisionInfo } from './jobs'
import { screenPeople } from './pairing'

// What a booth screen shows, built from stored events (coats, mixes) and STORED readings, so the
// same countdown comes out after a reload, a restart or on another instance. The assembly is pure
// (assembleScreenState); loadBoothScreenState reads what it needs; ScreenFeeds shares one throttled
// computation per booth among all the screens watching it and pushes it on every new reading.

/** A flash is followed for at most this long after its coat; later it is long over (or never will be). */
export const FLASH_HORIZON_MS = 6 * 3_600_000
/** Readings older than this are not read for a screen (a mix open longer counts its gap conservatively). */
export const SCREEN_LOOKBACK_MS = 8 * 3_600_000

export interface ScreenPerson {
  id: number
  name: string
  role: string
}

export interface ScreenFlash {
  coatId: number
  stage: FlashStage
  /** The product whose flash this is. */
  product: string
  finishedAt: string
  flashMinMinutes: number
  flashMaxMinutes: number
  progress: number | null
  ready: boolean
  readyAt: string | null
  readyBy: string | null
  recoatWindowEndsAt: string | null
  recoatWindowPassed: boolean
  rateNow: number | null
  uncertain: boolean
  reasons: EstimateReason[]
}

export interface ScreenMix {
  id: number
  revisionId: number
  product: string
  reducerGrade: string | null
  reducerAdvised: string | null
  amountMl: number | null
  mixedAt: string
  painter: string | null
  warnings: string[]
  potLife: { minutes: number; usedFraction: number | null; expired: boolean; expiresAt: string | null; uncertain: boolean; reasons: EstimateReason[] } | null
}

export interface BoothScreenState {
  boothId: number
  booth: { id: number; name: string; kind: string; hasHeater: boolean }
  units: SiteUnits
  serverTime: string
  conditions: {
    reading: LiveReading | null
    mode: string | null
    modeSince: string | null
    deviceStatus: string | null
    /** No reading for more than 30 s (or none at all). */
    stale: boolean
    lastReadingAt: string | null
  }
  job: {
    id: number
    number: string
    vehicle: string
    colourCode: string
    panels: string[]
    notes: string
    status: string
    painter: string | null
    painterId: number | null
  } | null
  plan: {
    stepId: number
    position: number
    revisionId: number
    product: string
    category: string | null
    chemistry: string | null
    components: number | null
    coatsPlanned: number
    coatsDone: number
    current: boolean
  }[]
  coatInProgress: { id: number; stepId: number; position: number; coatNumber: number; product: string; startedAt: string; painter: string | null } | null
  lastCoat: { id: number; stepId: number; position: number; coatNumber: number; product: string; finishedAt: string | null; painter: string | null } | null
  nextCoat: {
    stepId: number
    position: number
    coatNumber: number
    coatsPlanned: number
    revisionId: number
    product: string
    chemistry: string | null
    components: number | null
    mixRatio: string | null
    /** A new product starts with this coat. */
    newProduct: boolean
  } | null
  planComplete: boolean
  flash: ScreenFlash | null
  /** What starting the next coat now would run into (each needs a reason to go past). */
  checks: {
    flashReady: boolean | null
    applicationWindow: { product: string | null; ok: boolean; problems: { channel: string; value: number | null; limit: number; kind: string }[] }
    condensation: { ok: boolean; marginC: number | null; dewPointC: number | null; minMarginC: number }
    needsReason: ('flash_not_complete' | 'outside_application_window' | 'condensation_guard')[]
  }
  reducer: { product: string; airTempC: number | null; advised: string | null; bands: { minC: number | null; maxC: number | null; grade: string }[] } | null
  mixes: ScreenMix[]
  /** Revisions a mix may be logged for (the job's products), next coat's first. */
  mixChoices: { revisionId: number; stepId: number; product: string; bands: string[] }[]
  people: ScreenPerson[]
  /** The product of the next / current coat is two-component (hardener: isocyanates in most 2K refinish products). */
  twoK: boolean
}

export interface ScreenInput {
  nowMs: number
  booth: BoothScreenState['booth']
  units: SiteUnits
  live: LiveBoothState | null
  job: Job | null
  steps: JobStep[]
  coats: Coat[]
  revisions: Map<number, RevisionInfo>
  mixes: Mix[]
  /** Stored readings of the booth, time-ordered, covering what the flash and the mixes need. */
  samples: Sample[]
  people: ScreenPerson[]
  names: Map<number, string>
}

const iso = (ms: number | null) => (ms === null || !Number.isFinite(ms) ? null : new Date(ms).toISOString())
const finite = (v: number) => (Number.isFinite(v) ? v : null)
const label = (r: RevisionInfo | undefined) => (r ? `${r.productName}` : 'Unknown product')

/** The screen state from loaded rows and readings. Pure: same input, same state. */
export function assembleScreenState(inp: ScreenInput): BoothScreenState {
  const { nowMs, job, steps, coats, revisions: revs } = inp
  const name = (id: number | null) => (id === null ? null : (inp.names.get(id) ?? null))
  const reading = inp.live?.reading ?? null
  const lastMs = reading ? Date.parse(reading.receivedAt) : Number.NaN
  const stale = !reading || !(nowMs - lastMs <= STALE_AFTER_MS)

  const open = coats.find((c) => c.finished_at === null) ?? null
  const next = job ? nextCoatOf(steps, coats) : null
  const last = latestCoat(coats.filter((c) => c.finished_at !== null))
  const stepOf = (id: number) => steps.find((s) => s.id === id)
  const currentStep = open ? stepOf(open.step_id) : next?.step
  const currentRev = currentStep ? revs.get(currentStep.revision_id) : undefined

  // Flash of the last finished coat, unless a coat is being sprayed.
  let flash: ScreenFlash | null = null
  if (!open && last && last.finished_at) {
    const lastStep = stepOf(last.step_id)
    const rev = lastStep ? revs.get(lastStep.revision_id) : undefined
    if (rev) {
      const stage: FlashStage = next && next.step.id === last.step_id ? 'between-coats' : 'before-next'
      const spec = toFlashSpec(rev.product, rev.fields, stage)
      const finished = last.finished_at.getTime()
      const evalAt = Math.max(finished, Math.min(nowMs, finished + FLASH_HORIZON_MS))
      const r = flashProgress(spec, inp.samples, finished, evalAt)
      flash = {
        coatId: last.id,
        stage,
        product: label(rev),
        finishedAt: last.finished_at.toISOString(),
        flashMinMinutes: spec.flashMinMinutes,
        flashMaxMinutes: spec.flashMaxMinutes,
        progress: finite(r.progress),
        ready: r.ready,
        readyAt: iso(r.readyAtMs),
        readyBy: iso(r.readyByMs),
        recoatWindowEndsAt: iso(r.recoatWindowEndsAtMs),
        recoatWindowPassed: r.recoatWindowPassed,
        rateNow: finite(r.rateNow),
        uncertain: r.uncertain || evalAt < nowMs,
        reasons: r.reasons,
      }
    }
  }

  // Checks for starting the next coat now, on the stored reading held now (what the start will see).
  const held = readingAt(inp.samples, nowMs, DEFAULT_MAX_HOLD_MS)
  const nextRev = next ? revs.get(next.step.revision_id) : undefined
  // The window of the product being sprayed now, else of the one sprayed next.
  const app = applicationWindowCheck(currentRev ? applicationLimits(currentRev.fields) : {}, held)
  const surface = held.panelTempC ?? held.airTempC
  const cond = held.airTempC !== null && held.rhPct !== null && surface !== null ? condensationGuard(surface, held.airTempC, held.rhPct, DEW_POINT_MIN_MARGIN_C) : null
  const flashReady = flash ? flash.ready : next?.previous ? false : null
  const needsReason: BoothScreenState['checks']['needsReason'] = []
  if (next && !open) {
    if (flashReady === false) needsReason.push('flash_not_complete')
    if (!app.ok && app.limitsValid) needsReason.push('outside_application_window')
    if (!cond?.ok) needsReason.push('condensation_guard')
  }

  // Reducer advice for the product at hand, at the current booth temperature.
  const air = reading && !stale ? reading.airTempC : held.airTempC
  const bands = currentRev ? reducerBands(currentRev.fields) : []
  const reducer = currentRev && bands.length
    ? {
        product: label(currentRev),
        airTempC: air,
        advised: air === null ? null : reducerAdvice(bands, air),
        bands: bands.map((b) => ({ minC: finite(b.minC), maxC: finite(b.maxC), grade: b.grade })),
      }
    : null

  const mixes: ScreenMix[] = inp.mixes.map((m) => {
    const rev = revs.get(m.revision_id)
    const spec = rev ? toPotLifeSpec(rev.product, rev.fields) : null
    let pl: ScreenMix['potLife'] = null
    if (spec) {
      const mixed = m.mixed_at.getTime()
      const r = potLife(spec, inp.samples, mixed, Math.max(mixed, nowMs))
      pl = {
        minutes: spec.potLifeMinutes,
        usedFraction: finite(r.usedFraction),
        expired: r.expired,
        expiresAt: iso(r.expiresAtMs),
        uncertain: r.uncertain,
        reasons: r.reasons,
      }
    }
    return {
      id: m.id,
      revisionId: m.revision_id,
      product: label(rev),
      reducerGrade: m.reducer_grade,
      reducerAdvised: m.reducer_advised,
      amountMl: m.amount_ml,
      mixedAt: m.mixed_at.toISOString(),
      painter: name(m.painter_id),
      warnings: m.warnings,
      potLife: pl,
    }
  })

  const ordered = [...steps].sort((a, b) => a.position - b.position)
  const choiceSteps = currentStep ? [currentStep, ...ordered.filter((s) => s.id !== currentStep.id)] : ordered
  const mixChoices = choiceSteps
    .filter((s, i, all) => all.findIndex((x) => x.revision_id === s.revision_id) === i)
    .map((s) => {
      const rev = revs.get(s.revision_id)
      return { revisionId: s.revision_id, stepId: s.id, product: label(rev), bands: rev ? rev.fields.reducerBands.map((b) => b.grade) : [] }
    })

  const coatOf = (c: Coat) => {
    const st = stepOf(c.step_id)
    return { id: c.id, stepId: c.step_id, position: st?.position ?? 0, coatNumber: c.coat_number, product: label(st ? revs.get(st.revision_id) : undefined), painter: name(c.painter_id) }
  }

  return {
    boothId: inp.booth.id,
    booth: inp.booth,
    units: inp.units,
    serverTime: new Date(nowMs).toISOString(),
    conditions: {
      reading,
      mode: inp.live?.mode ?? null,
      modeSince: inp.live?.modeSince ?? null,
      deviceStatus: inp.live?.deviceStatus ?? null,
      stale,
      lastReadingAt: reading ? reading.receivedAt : null,
    },
    job: job
      ? {
          id: job.id,
          number: job.number,
          vehicle: job.vehicle,
          colourCode: job.colour_code,
          panels: job.panels,
          notes: job.notes,
          status: job.status,
          painter: name(job.painter_id),
          painterId: job.painter_id,
        }
      : null,
    plan: ordered.map((s) => {
      const rev = revs.get(s.revision_id)
      return {
        stepId: s.id,
        position: s.position,
        revisionId: s.revision_id,
        product: label(rev),
        category: rev?.category ?? null,
        chemistry: rev?.product.chemistry ?? null,
        components: rev?.product.components ?? null,
        coatsPlanned: s.coats_planned,
        coatsDone: coats.filter((c) => c.step_id === s.id).length,
        current: currentStep?.id === s.id,
      }
    }),
    coatInProgress: open ? { ...coatOf(open), startedAt: open.started_at.toISOString() } : null,
    lastCoat: last ? { ...coatOf(last), finishedAt: last.finished_at ? last.finished_at.toISOString() : null } : null,
    nextCoat:
      next && nextRev !== undefined
        ? {
            stepId: next.step.id,
            position: next.step.position,
            coatNumber: next.coatNumber,
            coatsPlanned: next.step.coats_planned,
            revisionId: next.step.revision_id,
            product: label(nextRev),
            chemistry: nextRev.product.chemistry,
            components: nextRev.product.components,
            mixRatio: nextRev.fields.mixRatio,
            newProduct: next.stage !== 'between-coats',
          }
        : null,
    planComplete: !!job && steps.length > 0 && !next && !open,
    flash,
    checks: {
      flashReady,
      applicationWindow: {
        product: currentRev ? label(currentRev) : null,
        ok: app.ok,
        problems: app.problems.map((p) => ({ channel: p.channel, value: p.value, limit: p.limit, kind: p.kind })),
      },
      condensation: {
        ok: !!cond?.ok,
        marginC: cond && Number.isFinite(cond.marginC) ? Math.round(cond.marginC * 100) / 100 : null,
        dewPointC: cond && Number.isFinite(cond.dewPointC) ? Math.round(cond.dewPointC * 100) / 100 : null,
        minMarginC: DEW_POINT_MIN_MARGIN_C,
      },
      needsReason,
    },
    reducer,
    mixes,
    mixChoices,
    people: inp.people,
    twoK: currentRev?.product.components === 2,
  }
}

/** The job a booth screen shows: the one with a coat being sprayed, else in the booth, curing, then planned. */
export function activeJobOf(jobs: readonly Job[], openCoatJobId: number | null): Job | null {
  if (openCoatJobId !== null) {
    const j = jobs.find((x) => x.id === openCoatJobId)
    if (j) return j
  }
  for (const status of ['in_booth', 'curing', 'planned'] as const) {
    const j = jobs.find((x) => x.status === status)
    if (j) return j
  }
  return null
}

export class ScreenStateError extends Error {
  readonly statusCode = 404
}

/** Reads everything a booth screen needs and assembles it. `live` defaults to the telemetry's live state. */
export async function loadBoothScreenState(db: Kysely<Database>, boothId: number, nowMs = Date.now(), live?: LiveBoothState | null): Promise<BoothScreenState> {
  const booth = await boothWithUnits(db, boothId)
  if (!booth) throw new ScreenStateError('No such booth')
  const [openJobs, openCoat, mixes, users] = await Promise.all([listOpenJobsOfBooth(db, boothId), findOpenCoatOfBooth(db, boothId), listOpenMixesOfBooth(db, boothId), listUsers(db)])
  let job = activeJobOf(openJobs, openCoat?.job_id ?? null)
  if (!job && openCoat) job = (await findJob(db, openCoat.job_id)) ?? null
  const [steps, coats] = job ? await Promise.all([listSteps(db, job.id), listCoatsOfJob(db, job.id)]) : [[], []]
  const revisions = await loadRevisions(db, [...steps.map((s) => s.revision_id), ...mixes.map((m) => m.revision_id)])

  // One read of stored readings from the earliest moment anything on screen needs.
  const last = latestCoat(coats.filter((c) => c.finished_at !== null))
  const starts = [nowMs, ...mixes.map((m) => m.mixed_at.getTime())]
  if (last?.finished_at) starts.push(last.finished_at.getTime())
  const from = Math.max(Math.min(...starts), nowMs - SCREEN_LOOKBACK_MS)
  const samples = await samplesOf(db, boothId, from, nowMs)

  let liveState = live
  if (liveState === undefined) {
    const t = telemetry()
    liveState = t ? (t.live.get(boothId) ?? null) : ((await loadLatestStates(db)).find((s) => s.boothId === boothId) ?? null)
  }
  return assembleScreenState({
    nowMs,
    booth: { id: booth.id, name: booth.name, kind: booth.kind, hasHeater: booth.has_heater },
    units: booth.units,
    live: liveState,
    job,
    steps,
    coats,
    revisions,
    mixes,
    samples,
    people: await screenPeople(db, job?.painter_id ?? null),
    names: new Map(users.map((u) => [u.id, u.name])),
  })
}

// ── one shared, throttled computation per booth ─────────────────────────────────────────────────

/** At most one recomputation per booth this often, however many screens watch it and readings arrive. */
export const MIN_RECOMPUTE_MS = 2_000
/** After a live reading, wait a moment so the writer (flush every ~250 ms) has stored it. */
export const SETTLE_MS = 600
/** Recompute at least this often while someone watches (staleness, pot life, projections move on). */
export const HEARTBEAT_MS = 10_000

type Listener = (s: BoothScreenState) => void

interface Feed {
  state: BoothScreenState | null
  computedAt: number
  dirty: boolean
  computing: Promise<BoothScreenState> | null
  timer: ReturnType<typeof setTimeout> | null
  heartbeat: ReturnType<typeof setInterval> | null
  listeners: Set<Listener>
  unsubscribeLive: (() => void) | null
}

export class ScreenFeeds {
  private readonly feeds = new Map<number, Feed>()

  constructor(
    private readonly compute: (boothId: number) => Promise<BoothScreenState>,
    private readonly liveSubscribe: (boothId: number, fn: () => void) => (() => void) | null,
    private readonly clock: () => number = Date.now,
  ) {}

  private feed(boothId: number): Feed {
    let f = this.feeds.get(boothId)
    if (!f) {
      f = { state: null, computedAt: 0, dirty: true, computing: null, timer: null, heartbeat: null, listeners: new Set(), unsubscribeLive: null }
      this.feeds.set(boothId, f)
    }
    return f
  }

  /** The booth's state: the shared one when it is fresh, else computed now (concurrent callers share it). */
  current(boothId: number): Promise<BoothScreenState> {
    const f = this.feed(boothId)
    if (f.state && !f.dirty && this.clock() - f.computedAt < MIN_RECOMPUTE_MS) return Promise.resolve(f.state)
    return this.run(boothId, f)
  }

  private run(boothId: number, f: Feed): Promise<BoothScreenState> {
    if (f.computing) return f.computing
    f.dirty = false
    const p = this.compute(boothId)
      .then((s) => {
        f.state = s
        f.computedAt = this.clock()
        for (const l of f.listeners) l(s)
        return s
      })
      .finally(() => {
        f.computing = null
        if (!f.listeners.size && !f.timer) this.drop(boothId, f)
      })
    f.computing = p
    return p
  }

  private schedule(boothId: number, f: Feed, minDelayMs: number): void {
    if (f.timer || !f.listeners.size) return
    const wait = Math.max(minDelayMs, f.computedAt + MIN_RECOMPUTE_MS - this.clock())
    f.timer = setTimeout(() => {
      f.timer = null
      if (!f.listeners.size) return
      this.run(boothId, f).catch((e: unknown) => console.warn(`[screen] booth ${boothId}:`, e instanceof Error ? e.message : e))
    }, wait)
  }

  /** Something on the booth changed (a coat, a mix): the next read recomputes and watchers get it soon. */
  changed(boothId: number): void {
    const f = this.feeds.get(boothId)
    if (!f) return
    f.dirty = true
    if (f.timer) {
      clearTimeout(f.timer)
      f.timer = null
    }
    // Actions are rare: no settle delay, only the shared throttle.
    this.schedule(boothId, f, 0)
  }

  /** Watch a booth: `fn` gets every new state. Returns the function that stops watching. */
  subscribe(boothId: number, fn: Listener): () => void {
    const f = this.feed(boothId)
    f.listeners.add(fn)
    const listen = () => {
      if (!f.unsubscribeLive) f.unsubscribeLive = this.liveSubscribe(boothId, () => this.schedule(boothId, f, SETTLE_MS))
    }
    listen()
    if (!f.heartbeat) {
      f.heartbeat = setInterval(() => {
        listen() // the telemetry may have started after the first screen connected
        f.dirty = true
        this.schedule(boothId, f, 0)
      }, HEARTBEAT_MS)
    }
    return () => {
      f.listeners.delete(fn)
      if (!f.listeners.size) this.drop(boothId, f)
    }
  }

  private drop(boothId: number, f: Feed): void {
    if (f.listeners.size) return
    if (f.timer) clearTimeout(f.timer)
    if (f.heartbeat) clearInterval(f.heartbeat)
    f.unsubscribeLive?.()
    f.timer = null
    f.heartbeat = null
    f.unsubscribeLive = null
    // Keep the last state a moment for plain GETs; a fresh one is computed when it is too old anyway.
    if (!f.computing && this.clock() - f.computedAt > MIN_RECOMPUTE_MS * 5) this.feeds.delete(boothId)
  }

  watchers(boothId: number): number {
    return this.feeds.get(boothId)?.listeners.size ?? 0
  }
}

let feeds: ScreenFeeds | undefined

/** The process-wide feeds, computing from `db` and listening to the telemetry's live hub. */
export function screenFeeds(db: Kysely<Database>): ScreenFeeds {
  feeds ??= new ScreenFeeds(
    (boothId) => loadBoothScreenState(db, boothId),
    (boothId, fn) => {
      const t = telemetry()
      return t ? t.live.subscribe(boothId, fn) : null
    },
  )
  return feeds
}

/**
 * After a coat or mix action on a booth: the screens of that booth recompute, and the alert
 * watches follow the product now being applied (limits), or stop (null). `undefined` = unchanged.
 */
export function afterBoothAction(db: Kysely<Database>, boothId: number, limits?: ReturnType<typeof applicationLimits> | null): void {
  screenFeeds(db).changed(boothId)
  if (limits === undefined) return
  try {
    setApplicationWindow(boothId, limits && Object.keys(limits).length ? limits : null)
  } catch (e) {
    console.warn(`[screen] application window of booth ${boothId} not watched:`, e instanceof Error ? e.message : e)
  }
}
