import type { Kysely } from 'kysely'
import {
  applicationWindowCheck,
  condensationGuard,
  DEFAULT_MAX_HOLD_MS,
  flashProgress,
  type ApplicationCheck,
  type FlashResult,
  type Sample,
} from '#shared/cure'
import { applicationLimits, toFlashSpec, type FlashStage } from '#shared/specs/engine-inputs'
import type { FinishCoatSchema, StartCoatSchema } from '#shared/schemas/jobs'
import type { z } from 'zod'
import type { Database } from '../db/database'
import type { Coat, CoatOverride, CoatStartCheck, JobStep } from '../db/tables/jobs'
import { finishCoatRow, findCoat, findOpenCoatOfBooth, insertCoat, listCoatsOfJob, lockCoat } from '../repositories/coats'
import { findJob, listSteps, lockJob, updateJob } from '../repositories/jobs'
import { rawSeries } from '../repositories/readings'
import { freezeRevision } from '../repositories/specs'
import { appendEvent, actorOf } from './event-log'
import { JobError, loadRevisions, revisionLabel, type RevisionInfo } from './jobs'
import { resolveActor, type Actor, type AttemptLimiter, type SessionLike } from './pairing'
import type { Hasher } from './accounts'

// Coats: the plan's next coat, the guard rails before a coat starts (flash of the coat before,
// application window, condensation), and the start / finish actions with their events.

/** Condensation guard margin (common coatings practice, DESIGN.md §6). */
export const DEW_POINT_MIN_MARGIN_C = 3
/** A coat may be entered afterwards, at most this long ago. */
export const BACKDATE_LIMIT_MS = 12 * 3_600_000
/** Tolerated clock difference for a time sent by a screen. */
export const CLOCK_SKEW_MS = 60_000

// ── the plan (pure) ─────────────────────────────────────────────────────────────────────────────

export interface NextCoat {
  step: JobStep
  coatNumber: number
  /** The latest coat of the job (its flash is what the next coat waits for); null before the first coat. */
  previous: Coat | null
  previousStep: JobStep | null
  /** 'between-coats' when the previous coat was the same product, 'before-next' when the product changes. */
  stage: FlashStage | null
}

/** The latest coat of a job (by start time, then id). */
export function latestCoat(coats: readonly Coat[]): Coat | null {
  let best: Coat | null = null
  for (const c of coats) {
    if (!best || c.started_at.getTime() > best.started_at.getTime() || (c.started_at.getTime() === best.started_at.getTime() && c.id > best.id)) best = c
  }
  return best
}

/** The next coat of the plan: the first step, in order, with coats left to spray; null when all are done. */
export function nextCoatOf(steps: readonly JobStep[], coats: readonly Coat[]): NextCoat | null {
  const previous = latestCoat(coats)
  const previousStep = previous ? (steps.find((s) => s.id === previous.step_id) ?? null) : null
  for (const step of [...steps].sort((a, b) => a.position - b.position)) {
    const done = coats.filter((c) => c.step_id === step.id).length
    if (done < step.coats_planned) {
      const stage: FlashStage | null = previous ? (previous.step_id === step.id ? 'between-coats' : 'before-next') : null
      return { step, coatNumber: done + 1, previous, previousStep, stage }
    }
  }
  return null
}

/** Plan position of a step, 1-based, and whether every planned coat of the plan is sprayed. */
export function planComplete(steps: readonly JobStep[], coats: readonly Coat[]): boolean {
  return steps.length > 0 && nextCoatOf(steps, coats) === null && coats.every((c) => c.finished_at !== null)
}

// ── readings ────────────────────────────────────────────────────────────────────────────────────

/** Stored readings of a booth in [fromMs − hold, toMs], as engine samples (the hold gives the starting value). */
export async function samplesOf(db: Kysely<Database>, boothId: number, fromMs: number, toMs: number): Promise<Sample[]> {
  const points = await rawSeries(db, boothId, new Date(fromMs - DEFAULT_MAX_HOLD_MS), new Date(toMs + 1))
  return points.map((p) => ({
    t: p.t.getTime(),
    airTempC: p.values.air_temp_c,
    rhPct: p.values.rh_pct,
    panelTempC: p.values.panel_temp_c,
    airflowMps: p.values.airflow_mps,
  }))
}

/** The held reading at atMs (each channel's last value within the hold), or null when nothing is held. */
export function readingAt(samples: readonly Sample[], atMs: number, maxHoldMs = DEFAULT_MAX_HOLD_MS) {
  const out: { airTempC: number | null; rhPct: number | null; panelTempC: number | null; airflowMps: number | null } = {
    airTempC: null,
    rhPct: null,
    panelTempC: null,
    airflowMps: null,
  }
  for (const ch of ['airTempC', 'rhPct', 'panelTempC', 'airflowMps'] as const) {
    let bestT = -Infinity
    for (const s of samples) {
      const v = s[ch]
      if (typeof v === 'number' && Number.isFinite(v) && s.t <= atMs && atMs - s.t < maxHoldMs && s.t >= bestT) {
        bestT = s.t
        out[ch] = v
      }
    }
  }
  return out
}

// ── guard rails (pure) ──────────────────────────────────────────────────────────────────────────

export interface FlashContext {
  previous: Coat
  stage: FlashStage
  revision: RevisionInfo
}

export interface GuardInput {
  atMs: number
  flash: (FlashContext & { result: FlashResult }) | null
  /** The application limits of the product about to be sprayed. */
  limits: ReturnType<typeof applicationLimits>
  reading: ReturnType<typeof readingAt>
}

export interface GuardOutcome {
  tripped: Omit<CoatOverride, 'reason'>[]
  startCheck: CoatStartCheck
  application: ApplicationCheck
}

const r1 = (v: number) => Math.round(v * 10) / 10
const hhmm = (ms: number) => new Date(ms).toISOString().slice(11, 16) + ' UTC'

function problemText(p: ApplicationCheck['problems'][number]): string {
  const what = p.channel === 'rhPct' ? 'relative humidity' : p.channel === 'panelTempC' ? 'panel temperature' : 'air temperature'
  const unit = p.channel === 'rhPct' ? ' %' : ' °C'
  if (p.kind === 'missing') return `no current ${what} reading`
  return `${what} ${r1(p.value ?? Number.NaN)}${unit} is ${p.kind} the data sheet's ${p.kind === 'below' ? 'minimum' : 'maximum'} ${p.limit}${unit}`
}

/** Which guard rails a coat start goes past, and what they saw (stored with the coat). */
export function evaluateGuards(g: GuardInput): GuardOutcome {
  const tripped: GuardOutcome['tripped'] = []
  const startCheck: CoatStartCheck = {}
  if (g.flash) {
    const { result, previous, stage, revision } = g.flash
    const finished = previous.finished_at!.getTime()
    const waited = (g.atMs - finished) / 60_000
    const progress = Number.isFinite(result.progress) ? result.progress : null
    startCheck.flash = {
      previousCoatId: previous.id,
      kind: stage === 'between-coats' ? 'between_coats' : 'next_product',
      waitedMinutes: r1(waited),
      progress: progress === null ? null : Math.round(progress * 1000) / 1000,
      ready: result.ready,
      readyAt: result.readyAtMs === null ? null : new Date(result.readyAtMs).toISOString(),
      requiredMinutes: result.readyAtMs === null ? null : r1((result.readyAtMs - finished) / 60_000),
      uncertain: result.uncertain,
    }
    if (!result.ready) {
      const what = stage === 'between-coats' ? 'the flash-off between coats' : `the flash before the next product (${revision.productName})`
      const pct = progress === null ? 'unknown' : `${Math.floor(progress * 100)} %`
      const eta = result.readyAtMs === null ? 'ready time unknown' : `ready at about ${hhmm(result.readyAtMs)}`
      tripped.push({ kind: 'flash_not_complete', detail: `The previous coat has not finished ${what}: ${pct} after ${r1(waited)} min, ${eta}.` })
    }
  }
  const application = applicationWindowCheck(g.limits, g.reading)
  startCheck.applicationWindow = { ok: application.ok, problems: application.problems.map(problemText) }
  if (!application.ok && application.limitsValid) {
    tripped.push({ kind: 'outside_application_window', detail: `Outside the product's application window: ${startCheck.applicationWindow.problems.join('; ')}.` })
  }
  const air = g.reading.airTempC
  const rh = g.reading.rhPct
  const surface = g.reading.panelTempC ?? air
  const cond = air !== null && rh !== null && surface !== null ? condensationGuard(surface, air, rh, DEW_POINT_MIN_MARGIN_C) : null
  const margin = cond && Number.isFinite(cond.marginC) ? Math.round(cond.marginC * 100) / 100 : null
  startCheck.condensation = { ok: !!cond?.ok, marginC: margin }
  if (!cond?.ok) {
    tripped.push({
      kind: 'condensation_guard',
      detail:
        margin === null
          ? 'No current reading of temperature and humidity: the dew-point margin cannot be checked.'
          : `The surface is only ${r1(margin)} °C above the dew point (keep at least ${DEW_POINT_MIN_MARGIN_C} °C).`,
    })
  }
  return { tripped, startCheck, application }
}

/** The flash of the previous coat at atMs, from stored readings of the booth it was sprayed in. */
export async function flashOf(db: Kysely<Database>, ctx: FlashContext, atMs: number): Promise<FlashResult> {
  const finished = ctx.previous.finished_at!.getTime()
  const samples = await samplesOf(db, ctx.previous.booth_id, finished, Math.max(finished, atMs))
  return flashProgress(toFlashSpec(ctx.revision.product, ctx.revision.fields, ctx.stage), samples, finished, Math.max(finished, atMs))
}

// ── actions ─────────────────────────────────────────────────────────────────────────────────────

export interface ActionContext {
  session: SessionLike
  hasher: Hasher
  limiter: AttemptLimiter
  now?: Date
}

/**
 * Who acts: a signed-in user's role is checked before anything is looked up (so an auditor gets 403
 * whatever the ids); a screen's PIN is checked for the booth the action is about.
 */
export async function actorFor(
  db: Kysely<Database>,
  ctx: ActionContext,
  creds: { painterId?: number; pin?: string },
  boothOf: () => Promise<number | null>,
): Promise<Actor> {
  if (ctx.session.user) return resolveActor(db, ctx, ctx.session, null, creds)
  return resolveActor(db, ctx, ctx.session, await boothOf(), creds)
}

function timeOf(at: string | undefined, now: Date, what: string): Date {
  if (!at) return now
  const t = new Date(at)
  if (t.getTime() > now.getTime() + CLOCK_SKEW_MS) throw new JobError(400, `The ${what} time is in the future`, [{ path: 'at', message: 'Not in the future' }])
  if (t.getTime() < now.getTime() - BACKDATE_LIMIT_MS) throw new JobError(400, `The ${what} time is more than 12 hours ago`, [{ path: 'at', message: 'Within the last 12 hours' }])
  return t
}

export interface CoatActionResult {
  coat: Coat
  actor: Actor
  jobId: number
  boothId: number
  /** Application limits of the product now being applied (null when the job's last coat finished). */
  limits: ReturnType<typeof applicationLimits> | null
  warnings: string[]
}

/**
 * Starts the plan's next coat. The screen sends which coat it showed (stepId, coatNumber); when the
 * plan moved on meanwhile the start is refused (409). Guard rails that are tripped need a reason;
 * without one the answer is 400 naming each of them, with one they are stored in coats.overrides.
 * The product revision is frozen in the same transaction.
 */
export async function startCoat(db: Kysely<Database>, ctx: ActionContext, input: z.output<typeof StartCoatSchema>): Promise<CoatActionResult> {
  const now = ctx.now ?? new Date()
  const actor = await actorFor(db, ctx, input, async () => {
    const job = await findJob(db, input.jobId)
    if (!job) throw new JobError(404, 'No such job')
    return job.booth_id
  })
  const pre = await findJob(db, input.jobId)
  if (!pre) throw new JobError(404, 'No such job')
  if (!pre.booth_id) throw new JobError(400, 'Assign the job to a booth before spraying')
  const at = timeOf(input.at, now, 'start')

  return db.transaction().execute(async (tx) => {
    const job = await lockJob(tx, input.jobId)
    if (!job || !job.booth_id) throw new JobError(404, 'No such job')
    if (job.booth_id !== pre.booth_id) throw new JobError(409, 'The job moved to another booth meanwhile. Reload.')
    if (job.status === 'done') throw new JobError(409, `Job ${job.number} is done`)
    const boothId = job.booth_id
    const open = await findOpenCoatOfBooth(tx, boothId)
    if (open) throw new JobError(409, 'A coat is still being sprayed in this booth: finish it first')
    const [steps, coats] = await Promise.all([listSteps(tx, job.id), listCoatsOfJob(tx, job.id)])
    const next = nextCoatOf(steps, coats)
    if (!next) throw new JobError(409, `Every planned coat of ${job.number} is sprayed`)
    if (next.step.id !== input.stepId || next.coatNumber !== input.coatNumber) {
      throw new JobError(409, `The finish plan moved on: the next coat is coat ${next.coatNumber} of step ${next.step.position}. Reload the screen.`)
    }
    if (next.previous && !next.previous.finished_at) throw new JobError(409, 'The previous coat of this job is still being sprayed: finish it first')
    if (next.previous?.finished_at && at.getTime() < next.previous.finished_at.getTime()) {
      throw new JobError(400, 'A coat cannot start before the previous one finished', [{ path: 'at', message: 'After the previous coat' }])
    }
    const revs = await loadRevisions(tx, [next.step.revision_id, ...(next.previousStep ? [next.previousStep.revision_id] : [])])
    const revision = revs.get(next.step.revision_id)
    if (!revision) throw new JobError(400, 'The product revision of this step no longer exists')

    let flash: GuardInput['flash'] = null
    if (next.previous && next.previousStep && next.stage) {
      const prevRev = revs.get(next.previousStep.revision_id)
      if (prevRev) {
        const fctx = { previous: next.previous, stage: next.stage, revision: prevRev }
        flash = { ...fctx, result: await flashOf(tx, fctx, at.getTime()) }
      }
    }
    const around = await samplesOf(tx, boothId, at.getTime(), at.getTime())
    const limits = applicationLimits(revision.fields)
    const guards = evaluateGuards({ atMs: at.getTime(), flash, limits, reading: readingAt(around, at.getTime()) })
    if (guards.tripped.length && !input.reason) {
      const issues = guards.tripped.map((t) => ({ path: 'reason', message: t.detail }))
      const first = guards.tripped[0]!
      const message =
        guards.tripped.length === 1 && first.kind === 'flash_not_complete'
          ? `${first.detail} Give a reason to start early.`
          : `Give a reason to start this coat: ${guards.tripped.map((t) => t.detail).join(' ')}`
      throw new JobError(400, message, issues)
    }
    const overrides: CoatOverride[] = guards.tripped.map((t) => ({ ...t, reason: input.reason! }))
    const coat = await insertCoat(tx, {
      jobId: job.id,
      stepId: next.step.id,
      boothId,
      coatNumber: next.coatNumber,
      painterId: actor.id,
      startedAt: at,
      overrides,
      startCheck: guards.startCheck,
    })
    await freezeRevision(tx, revision.id)
    if (job.status !== 'in_booth') await updateJob(tx, job.id, { status: 'in_booth' })
    await appendEvent(tx, {
      type: 'coat.started',
      actor: actorOf(actor),
      subject: { type: 'job', id: job.id },
      at: now,
      data: {
        coatId: coat.id,
        jobNumber: job.number,
        boothId,
        stepId: next.step.id,
        stepPosition: next.step.position,
        coatNumber: next.coatNumber,
        revisionId: revision.id,
        product: revisionLabel(revision),
        startedAt: at.toISOString(),
        via: actor.via,
        overrides,
        startCheck: guards.startCheck,
      },
    })
    return { coat, actor, jobId: job.id, boothId, limits, warnings: guards.tripped.map((t) => t.detail) }
  })
}

/** Finishes a coat in progress; after the plan's last coat the job moves on to curing. */
export async function finishCoat(db: Kysely<Database>, ctx: ActionContext, coatId: number, input: z.output<typeof FinishCoatSchema>): Promise<CoatActionResult> {
  const now = ctx.now ?? new Date()
  const actor = await actorFor(db, ctx, input, async () => {
    const coat = await findCoat(db, coatId)
    if (!coat) throw new JobError(404, 'No such coat')
    return coat.booth_id
  })
  const pre = await findCoat(db, coatId)
  if (!pre) throw new JobError(404, 'No such coat')
  const at = timeOf(input.at, now, 'finish')
  return db.transaction().execute(async (tx) => {
    const job = await lockJob(tx, pre.job_id)
    const coat = await lockCoat(tx, coatId)
    if (!job || !coat) throw new JobError(404, 'No such coat')
    if (coat.finished_at) throw new JobError(409, 'This coat is already finished')
    if (at.getTime() < coat.started_at.getTime()) throw new JobError(400, 'A coat cannot finish before it started', [{ path: 'at', message: 'After the start' }])
    const done = await finishCoatRow(tx, coatId, at, actor.id)
    if (!done) throw new JobError(409, 'This coat is already finished')
    const [steps, coats] = await Promise.all([listSteps(tx, job.id), listCoatsOfJob(tx, job.id)])
    const last = planComplete(steps, coats)
    if (last) await updateJob(tx, job.id, { status: 'curing' })
    const step = steps.find((s) => s.id === coat.step_id)
    const revision = step ? (await loadRevisions(tx, [step.revision_id])).get(step.revision_id) : undefined
    await appendEvent(tx, {
      type: 'coat.finished',
      actor: actorOf(actor),
      subject: { type: 'job', id: job.id },
      at: now,
      data: {
        coatId,
        jobNumber: job.number,
        boothId: coat.booth_id,
        stepId: coat.step_id,
        coatNumber: coat.coat_number,
        finishedAt: at.toISOString(),
        sprayMinutes: r1((at.getTime() - coat.started_at.getTime()) / 60_000),
        lastCoatOfPlan: last,
        via: actor.via,
      },
    })
    return {
      coat: done,
      actor,
      jobId: job.id,
      boothId: coat.booth_id,
      limits: last || !revision ? null : applicationLimits(revision.fields),
      warnings: [],
    }
  })
}
