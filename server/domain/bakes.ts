import type { Kysely, Transaction } from 'kysely'
import { detectPhases, phaseAt, type BakeSample, type PhaseName, type PhaseResult } from '#shared/bake/phases'
import { holdTargetOf, judgeBake, minutesText, type BakeJudgement, type BakeSchedule } from '#shared/bake/verdict'
import { BAKE_CAUTIONS, SAFETY_DEFERRAL } from '#shared/bake/safety'
import type { BakeResultSnapshot, BakeSource } from '#shared/bake/types'
import type { StartBakeInput } from '#shared/bake/schemas'
import { toCureSpecs } from '#shared/specs/engine-inputs'
import type { Database } from '../db/database'
import type { Bake } from '../db/tables/bakes'
import {
  bakeReadings,
  findBake,
  insertBakeIfNone,
  jobsInBooth,
  linkedJobs,
  linkJobs,
  listBakes,
  lockBake,
  runningBakeOf,
  updateBake,
  type BakeFilter,
  type BakeListRow,
  type LinkedJob,
} from '../repositories/bakes'
import { findBooth } from '../repositories/booths'
import { findRevisionWithProduct } from '../repositories/specs'
import { applyCalibration } from './calibration'
import { actorOf, appendEvent, recorded, type EventInput } from './event-log'

// Bake cycles: opened by a tech, or by the detector when the booth goes into bake (state 'detected', to be
// confirmed); linked to the jobs in the booth and the spec revisions of their last products; phases, time at
// temperature and cure credit computed from the stored readings (calibrated at read time) on every read until
// the tech signs the bake off, when the result is frozen on the record and in the `bake.signed_off` event.

type Db = Kysely<Database>
type Who = { id: number; name: string; role: string }

export const SYSTEM_DETECTOR = { id: null, label: 'Boothbeat (bake detector)' } as const
/** A bake may be entered up to this far back (a tech recording one after the fact). */
export const BACKDATE_LIMIT_MS = 12 * 3_600_000
/** Device clocks and browsers drift: times this far ahead of the server still count as now. */
const CLOCK_SLACK_MS = 5 * 60_000
/** Readings looked at per bake: a bake left open longer than this is judged on its first 12 h only. */
export const MAX_EVALUATED_MS = 12 * 3_600_000
const PRE_START_MS = 120_000

export class BakeError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
  ) {
    super(message)
  }
}

// ── schedules of the products in the bake ────────────────────────────────────────────────────────

export interface BakeProductInfo {
  jobId: number
  jobNumber: string
  vehicle: string
  stepId: number | null
  revisionId: number | null
  productName: string | null
  revisionNumber: number | null
  /** The TDS bake schedules, e.g. "30 min at 60 °C". */
  schedules: string[]
  /** Why there is nothing to judge against, when that is so. */
  note: string | null
}

async function schedulesFor(db: Db, links: readonly LinkedJob[]): Promise<{ schedules: BakeSchedule[]; products: BakeProductInfo[] }> {
  const revisions = new Map<number, Awaited<ReturnType<typeof findRevisionWithProduct>>>()
  for (const id of new Set(links.map((l) => l.revision_id).filter((x): x is number => x !== null))) {
    revisions.set(id, await findRevisionWithProduct(db, id))
  }
  const schedules: BakeSchedule[] = []
  const products: BakeProductInfo[] = []
  for (const l of links) {
    const info: BakeProductInfo = {
      jobId: l.job_id,
      jobNumber: l.number,
      vehicle: l.vehicle,
      stepId: l.step_id,
      revisionId: l.revision_id,
      productName: null,
      revisionNumber: null,
      schedules: [],
      note: null,
    }
    const found = l.revision_id === null ? undefined : revisions.get(l.revision_id)
    if (!found) {
      info.note = l.revision_id === null ? 'No coat recorded on this job yet: no product to judge the bake against' : 'The spec revision was not found'
      products.push(info)
      continue
    }
    info.productName = found.product.name
    info.revisionNumber = found.revision.number
    const specs = toCureSpecs(found.product, found.revision)
    specs.forEach((spec, i) => {
      const label = `${minutesText(spec.requiredMinutes)} min at ${minutesText(spec.specTempC)} °C`
      info.schedules.push(label)
      schedules.push({
        key: `job-${l.job_id}/rev-${found.revision.id}/${i}`,
        label: `${found.product.name} (rev. ${found.revision.number}) — ${label}`,
        spec,
        jobId: l.job_id,
        jobNumber: l.number,
        revisionId: found.revision.id,
        productName: found.product.name,
      })
    })
    if (!specs.length) info.note = 'The data sheet gives no bake schedule for this product'
    products.push(info)
  }
  return { schedules, products }
}

// ── readings ─────────────────────────────────────────────────────────────────────────────────────

/** Calibrated panel / air / heater samples of a booth over [fromMs − 2 min, toMs] (the bake engine's input). */
export async function bakeSamples(db: Db, boothId: number, fromMs: number, toMs: number): Promise<BakeSample[]> {
  const rows = await bakeReadings(db, boothId, new Date(fromMs - PRE_START_MS), new Date(toMs))
  return rows.map((r) => {
    const t = r.ts.getTime()
    return {
      t,
      panelTempC: applyCalibration(boothId, 'panelTempC', t, r.panel_temp_c),
      airTempC: applyCalibration(boothId, 'airTempC', t, r.air_temp_c),
      heaterOn: r.heater_on,
    }
  })
}

// ── evaluation ───────────────────────────────────────────────────────────────────────────────────

export interface BakeEvaluation {
  computedAt: string
  /** True when read from the sign-off snapshot. */
  frozen: boolean
  running: boolean
  evaluatedUntil: string
  targetC: number | null
  targetSource: 'tech' | 'spec' | 'inferred' | null
  phaseNow: PhaseName | null
  panelTempNowC: number | null
  phases: PhaseResult
  judgement: BakeJudgement
}

function targetOf(bake: Bake, schedules: readonly BakeSchedule[]): { targetC: number | null; source: 'tech' | 'spec' | null } {
  if (bake.target_temp_c !== null) return { targetC: bake.target_temp_c, source: 'tech' }
  const t = holdTargetOf(schedules)
  return t === null ? { targetC: null, source: null } : { targetC: t, source: 'spec' }
}

async function evaluate(db: Db, bake: Bake, schedules: readonly BakeSchedule[], nowMs: number): Promise<BakeEvaluation> {
  const startMs = bake.started_at.getTime()
  const running = bake.ended_at === null
  const endMs = Math.max(startMs, Math.min(running ? nowMs : bake.ended_at!.getTime(), startMs + MAX_EVALUATED_MS))
  const samples = await bakeSamples(db, bake.booth_id, startMs, endMs)
  const { targetC, source } = targetOf(bake, schedules)
  const phases = detectPhases(samples, startMs, endMs, { targetC })
  const judgement = judgeBake(schedules, samples, startMs, endMs, { running })
  let panelNow: number | null = null
  if (running) {
    for (let i = samples.length - 1; i >= 0; i--) {
      const s = samples[i]!
      if (nowMs - s.t > PRE_START_MS) break
      const v = s.panelTempC ?? null
      if (v !== null) {
        panelNow = v
        break
      }
    }
  }
  return {
    computedAt: new Date(nowMs).toISOString(),
    frozen: false,
    running,
    evaluatedUntil: new Date(endMs).toISOString(),
    targetC: phases.targetC,
    targetSource: phases.targetInferred ? 'inferred' : source,
    phaseNow: running ? phaseAt(phases, endMs) : null,
    panelTempNowC: panelNow,
    phases,
    judgement,
  }
}

function fromSnapshot(s: BakeResultSnapshot): BakeEvaluation {
  return {
    computedAt: s.computedAt,
    frozen: true,
    running: false,
    evaluatedUntil: s.endedAt ?? s.computedAt,
    targetC: s.phases.targetC,
    targetSource: (s as BakeResultSnapshot & { targetSource?: BakeEvaluation['targetSource'] }).targetSource ?? null,
    phaseNow: null,
    panelTempNowC: null,
    phases: s.phases,
    judgement: s.judgement,
  }
}

// ── views ────────────────────────────────────────────────────────────────────────────────────────

const iso = (d: Date | null) => (d ? d.toISOString() : null)

function actionsOf(b: Bake) {
  const running = b.ended_at === null
  return {
    confirm: b.state === 'detected',
    dismiss: b.state === 'detected',
    end: running && b.state !== 'dismissed',
    signOff: !running && b.state === 'confirmed',
  }
}

export function bakeSummary(b: BakeListRow, jobs: readonly LinkedJob[] = []) {
  return {
    id: b.id,
    boothId: b.booth_id,
    boothName: b.booth_name,
    state: b.state,
    source: b.source,
    running: b.ended_at === null && b.state !== 'dismissed',
    startedAt: b.started_at.toISOString(),
    endedAt: iso(b.ended_at),
    endSource: b.end_source,
    targetC: b.target_temp_c,
    notes: b.notes,
    startedBy: b.started_by_name,
    confirmedAt: iso(b.confirmed_at),
    confirmedBy: b.confirmed_by_name,
    endedBy: b.ended_by_name,
    signedOffAt: iso(b.signed_off_at),
    signedOffBy: b.signed_off_by_name,
    signOffNotes: b.sign_off_notes,
    dismissReason: b.dismiss_reason,
    /** Frozen verdict (signed off), else null: the detail computes the live one. */
    verdict: b.result?.judgement.verdict ?? null,
    jobs: jobs.filter((j) => j.bake_id === b.id).map((j) => ({ jobId: j.job_id, number: j.number, vehicle: j.vehicle })),
    actions: actionsOf(b),
  }
}

export const SAFETY = { cautions: BAKE_CAUTIONS, deferral: SAFETY_DEFERRAL }

export async function listBakeViews(db: Db, f: BakeFilter) {
  const rows = await listBakes(db, f)
  const jobs = await linkedJobs(
    db,
    rows.map((r) => r.id),
  )
  return rows.map((r) => bakeSummary(r, jobs))
}

export async function getBake(db: Db, id: number, nowMs = Date.now()) {
  const b = await findBake(db, id)
  if (!b) throw new BakeError(404, 'No such bake')
  const links = await linkedJobs(db, [id])
  const { schedules, products } = await schedulesFor(db, links)
  const evaluation = b.result ? fromSnapshot(b.result) : b.state === 'dismissed' ? null : await evaluate(db, b, schedules, nowMs)
  return { bake: { ...bakeSummary(b, links), products }, evaluation, safety: SAFETY }
}

// ── actions ──────────────────────────────────────────────────────────────────────────────────────

function checkTime(atMs: number, nowMs: number, what: string): void {
  if (atMs > nowMs + CLOCK_SLACK_MS) throw new BakeError(400, `The ${what} cannot be in the future`)
  if (atMs < nowMs - BACKDATE_LIMIT_MS) throw new BakeError(400, `The ${what} can be at most 12 hours ago`)
}

async function linkJobsNow(db: Db, bakeId: number, boothId: number): Promise<number[]> {
  const jobs = await jobsInBooth(db, boothId)
  await linkJobs(db, bakeId, jobs)
  return jobs.map((j) => j.job_id)
}

/** A tech starts a bake by hand (confirmed at once). 409 when the booth already has a running bake. */
export async function startBake(db: Db, user: Who, input: StartBakeInput, nowMs = Date.now()) {
  const booth = await findBooth(db, input.boothId)
  if (!booth) throw new BakeError(404, 'No such booth')
  const startMs = input.startedAt ? Date.parse(input.startedAt) : nowMs
  checkTime(startMs, nowMs, 'start time')
  const now = new Date(nowMs)
  const created = await recorded(
    db,
    async (tx) => {
      const b = await insertBakeIfNone(tx, {
        booth_id: booth.id,
        state: 'confirmed',
        source: 'manual',
        started_at: new Date(startMs),
        target_temp_c: input.targetC ?? null,
        notes: input.notes ?? '',
        started_by: user.id,
        confirmed_at: now,
        confirmed_by: user.id,
      })
      if (!b) {
        const running = await runningBakeOf(tx, booth.id)
        throw new BakeError(409, `A bake is already running in ${booth.name}${running ? ` (bake ${running.id})` : ''}: end it first`)
      }
      return { bake: b, jobIds: await linkJobsNow(tx, b.id, booth.id) }
    },
    ({ bake, jobIds }) => ({
      type: 'bake.started',
      actor: actorOf(user),
      subject: { type: 'bake', id: bake.id },
      data: { boothId: bake.booth_id, startedAt: bake.started_at.toISOString(), targetC: bake.target_temp_c, jobIds, notes: bake.notes },
    }),
  )
  bakeChanged(created.bake.booth_id)
  return created.bake
}

/** The detector opens a bake (state 'detected'); undefined when the booth already has a running one. */
export async function openDetectedBake(db: Db, boothId: number, startMs: number, source: Exclude<BakeSource, 'manual'>) {
  const out = await db.transaction().execute(async (tx) => {
    const b = await insertBakeIfNone(tx, { booth_id: boothId, state: 'detected', source, started_at: new Date(startMs) })
    if (!b) return undefined
    const jobIds = await linkJobsNow(tx, b.id, boothId)
    await appendEvent(tx, {
      type: 'bake.detected',
      actor: SYSTEM_DETECTOR,
      subject: { type: 'bake', id: b.id },
      data: { boothId, startedAt: b.started_at.toISOString(), source, jobIds },
    })
    return b
  })
  if (out) bakeChanged(boothId)
  return out
}

/** The detector ends the booth's running bake at atMs (mode left bake / cool, or the heater rule). */
export async function closeRunningBake(db: Db, boothId: number, atMs: number, source: Exclude<BakeSource, 'manual'>) {
  const out = await recordedIf(db, async (tx) => {
    const running = await runningBakeOf(tx, boothId)
    if (!running) return undefined
    const b = await lockBake(tx, running.id)
    if (!b || b.ended_at !== null || b.started_at.getTime() > atMs) return undefined
    const updated = await updateBake(tx, b.id, { ended_at: new Date(atMs), end_source: source })
    return {
      result: updated,
      event: {
        type: 'bake.ended',
        actor: SYSTEM_DETECTOR,
        subject: { type: 'bake', id: b.id },
        data: { boothId, endedAt: updated.ended_at!.toISOString(), source },
      } satisfies EventInput,
    }
  })
  if (out) bakeChanged(boothId)
  return out
}

/** Like `recorded`, but the action may decide there is nothing to record (then no event either). */
async function recordedIf<T>(db: Db, action: (tx: Transaction<Database>) => Promise<{ result: T; event: EventInput } | undefined>) {
  return db.transaction().execute(async (tx) => {
    const r = await action(tx)
    if (!r) return undefined
    await appendEvent(tx, r.event)
    return r.result
  })
}

async function mustLock(tx: Transaction<Database>, id: number): Promise<Bake> {
  const b = await lockBake(tx, id)
  if (!b) throw new BakeError(404, 'No such bake')
  return b
}

/** A tech confirms a detected bake (optionally giving the hold temperature); the jobs in the booth are linked again. */
export async function confirmBake(db: Db, user: Who, id: number, input: { targetC?: number | null; notes?: string }, nowMs = Date.now()) {
  const out = await recorded(
    db,
    async (tx) => {
      const b = await mustLock(tx, id)
      if (b.state !== 'detected') throw new BakeError(409, b.state === 'dismissed' ? 'This bake was dismissed' : 'This bake is already confirmed')
      const updated = await updateBake(tx, id, {
        state: 'confirmed',
        confirmed_at: new Date(nowMs),
        confirmed_by: user.id,
        ...(input.targetC !== undefined ? { target_temp_c: input.targetC } : {}),
        ...(input.notes !== undefined ? { notes: input.notes } : {}),
      })
      const jobIds = b.ended_at === null ? await linkJobsNow(tx, id, b.booth_id) : (await linkedJobs(tx, [id])).map((j) => j.job_id)
      return { bake: updated, jobIds }
    },
    ({ bake, jobIds }) => ({
      type: 'bake.confirmed',
      actor: actorOf(user),
      subject: { type: 'bake', id },
      data: { boothId: bake.booth_id, startedAt: bake.started_at.toISOString(), targetC: bake.target_temp_c, jobIds },
    }),
  )
  bakeChanged(out.bake.booth_id)
  return out.bake
}

/** A detection that was not a bake (a heater test, a warm-up): closed and kept, out of the counts. */
export async function dismissBake(db: Db, user: Who, id: number, reason: string, nowMs = Date.now()) {
  const out = await recorded(
    db,
    async (tx) => {
      const b = await mustLock(tx, id)
      if (b.state !== 'detected') throw new BakeError(409, 'Only a detected bake that is not confirmed can be dismissed')
      const endedAt = b.ended_at ?? new Date(Math.max(nowMs, b.started_at.getTime()))
      return updateBake(tx, id, { state: 'dismissed', dismiss_reason: reason, ended_at: endedAt, ended_by: b.ended_at ? b.ended_by : user.id, end_source: b.end_source ?? 'manual' })
    },
    (b) => ({ type: 'bake.dismissed', actor: actorOf(user), subject: { type: 'bake', id }, data: { boothId: b.booth_id, reason } }),
  )
  bakeChanged(out.booth_id)
  return out
}

export async function endBake(db: Db, user: Who, id: number, input: { endedAt?: string }, nowMs = Date.now()) {
  const endMs = input.endedAt ? Date.parse(input.endedAt) : nowMs
  if (endMs > nowMs + CLOCK_SLACK_MS) throw new BakeError(400, 'The end time cannot be in the future')
  const out = await recorded(
    db,
    async (tx) => {
      const b = await mustLock(tx, id)
      if (b.ended_at !== null || b.state === 'dismissed') throw new BakeError(409, 'This bake has already ended')
      if (endMs < b.started_at.getTime()) throw new BakeError(400, 'The end time is before the start of the bake')
      return updateBake(tx, id, { ended_at: new Date(endMs), ended_by: user.id, end_source: 'manual' })
    },
    (b) => ({ type: 'bake.ended', actor: actorOf(user), subject: { type: 'bake', id }, data: { boothId: b.booth_id, endedAt: b.ended_at!.toISOString(), source: 'manual' } }),
  )
  bakeChanged(out.booth_id)
  return out
}

/**
 * The tech signs an ended, confirmed bake off with notes: the phases and verdicts computed now are frozen on
 * the record and carried by the `bake.signed_off` event.
 */
export async function signOffBake(db: Db, user: Who, id: number, notes: string, nowMs = Date.now()) {
  const pre = await findBake(db, id)
  if (!pre) throw new BakeError(404, 'No such bake')
  const links = await linkedJobs(db, [id])
  const { schedules } = await schedulesFor(db, links)
  const out = await recorded(
    db,
    async (tx) => {
      const b = await mustLock(tx, id)
      if (b.state === 'signed_off') throw new BakeError(409, 'This bake is already signed off')
      if (b.state === 'dismissed') throw new BakeError(409, 'This bake was dismissed')
      if (b.state === 'detected') throw new BakeError(409, 'Confirm the bake before signing it off')
      if (b.ended_at === null) throw new BakeError(409, 'End the bake before signing it off')
      const ev = await evaluate(tx, b, schedules, nowMs)
      const snapshot: BakeResultSnapshot & { targetSource: BakeEvaluation['targetSource'] } = {
        computedAt: ev.computedAt,
        startedAt: b.started_at.toISOString(),
        endedAt: b.ended_at.toISOString(),
        phases: ev.phases,
        judgement: ev.judgement,
        targetSource: ev.targetSource,
      }
      const updated = await updateBake(tx, id, {
        state: 'signed_off',
        signed_off_at: new Date(nowMs),
        signed_off_by: user.id,
        sign_off_notes: notes,
        result: JSON.stringify(snapshot),
      })
      return { bake: updated, snapshot }
    },
    ({ bake, snapshot }) => ({
      type: 'bake.signed_off',
      actor: actorOf(user),
      subject: { type: 'bake', id },
      data: {
        boothId: bake.booth_id,
        startedAt: snapshot.startedAt,
        endedAt: snapshot.endedAt,
        notes,
        verdict: snapshot.judgement.verdict,
        targetC: snapshot.phases.targetC,
        phases: snapshot.phases.phases.map((p) => ({ phase: p.phase, startedAt: new Date(p.startMs).toISOString(), endedAt: new Date(p.endMs).toISOString() })),
        holdMinutes: Math.round(snapshot.phases.holdMinutes * 10) / 10,
        products: snapshot.judgement.products.map((p) => ({
          jobId: p.jobId,
          revisionId: p.revisionId,
          verdict: p.verdict,
          schedules: p.schedules.map((s) => ({ label: s.label, verdict: s.verdict, reason: s.reason })),
        })),
      },
    }),
  )
  bakeChanged(out.bake.booth_id)
  return out.bake
}

// ── bake state for the booth screen ──────────────────────────────────────────────────────────────

const screenCache = new Map<number, { at: number; value: Promise<BoothBakeState> }>()
const SCREEN_CACHE_MS = 5_000

function bakeChanged(boothId: number): void {
  screenCache.delete(boothId)
}

export interface BoothBakeState {
  boothId: number
  /** The running bake, else the last one that ended within the hour; null when none. */
  bake: {
    id: number
    state: Bake['state']
    running: boolean
    source: BakeSource
    startedAt: string
    endedAt: string | null
    phaseNow: PhaseName | null
    targetC: number | null
    panelTempNowC: number | null
    heldMinutes: number
    /** When every product in the bake is cured (reached or projected); null when unknown. */
    cureCompleteAt: string | null
    verdict: BakeJudgement['verdict']
    products: { jobNumber: string | null; productName: string | null; verdict: string; progress: number | null; completeAt: string | null }[]
  } | null
  cautions: typeof BAKE_CAUTIONS
  deferral: string
}

/**
 * What a booth screen's bake panel shows: the running (or just ended) bake, its phase, the live "cure complete
 * at" estimate and the safety cautions. Cached for 5 s per booth (screens poll); any bake action clears it.
 */
export function bakeStateForBooth(db: Db, boothId: number, nowMs = Date.now()): Promise<BoothBakeState> {
  const hit = screenCache.get(boothId)
  if (hit && nowMs - hit.at < SCREEN_CACHE_MS) return hit.value
  const value = computeBoothBakeState(db, boothId, nowMs)
  screenCache.set(boothId, { at: nowMs, value })
  value.catch(() => screenCache.delete(boothId))
  return value
}

async function computeBoothBakeState(db: Db, boothId: number, nowMs: number): Promise<BoothBakeState> {
  const base = { boothId, bake: null, cautions: BAKE_CAUTIONS, deferral: SAFETY_DEFERRAL }
  const [latest] = await listBakes(db, { boothId, limit: 1 })
  if (!latest || latest.state === 'dismissed') return base
  if (latest.ended_at && nowMs - latest.ended_at.getTime() > 3_600_000) return base
  const links = await linkedJobs(db, [latest.id])
  const { schedules } = await schedulesFor(db, links)
  const ev = latest.result ? fromSnapshot(latest.result) : await evaluate(db, latest, schedules, nowMs)
  const j = ev.judgement
  return {
    ...base,
    bake: {
      id: latest.id,
      state: latest.state,
      running: latest.ended_at === null,
      source: latest.source,
      startedAt: latest.started_at.toISOString(),
      endedAt: iso(latest.ended_at),
      phaseNow: ev.phaseNow,
      targetC: ev.targetC,
      panelTempNowC: ev.panelTempNowC,
      heldMinutes: Math.round(ev.phases.holdMinutes * 10) / 10,
      cureCompleteAt: j.cureCompleteAtMs === null ? null : new Date(j.cureCompleteAtMs).toISOString(),
      verdict: j.verdict,
      products: j.products.map((p) => {
        const best = p.schedules.reduce<(typeof p.schedules)[number] | null>((a, s) => (a === null || (s.progress ?? 0) > (a.progress ?? 0) ? s : a), null)
        return {
          jobNumber: p.jobNumber,
          productName: p.productName,
          verdict: p.verdict,
          progress: best?.progress ?? null,
          completeAt: p.completeAtMs === null ? null : new Date(p.completeAtMs).toISOString(),
        }
      }),
    },
  }
}

/** Running bakes per booth, for the detector at start-up. */
export { listRunningBakes } from '../repositories/bakes'
export type { BakeFilter }
