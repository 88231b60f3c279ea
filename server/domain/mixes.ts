import type { Kysely } from 'kysely'
import type { z } from 'zod'
import { potLife, reducerAdvice, reducerCheck } from '#shared/cure'
import { reducerBands, toPotLifeSpec } from '#shared/specs/engine-inputs'
import type { CloseMixSchema, LogMixSchema } from '#shared/schemas/jobs'
import type { Database } from '../db/database'
import type { Mix } from '../db/tables/jobs'
import { findBooth } from '../repositories/booths'
import { findJob, listSteps } from '../repositories/jobs'
import { closeMixRow, findMix, insertMix } from '../repositories/mixes'
import { freezeRevision } from '../repositories/specs'
import { appendEvent, actorOf } from './event-log'
import { actorFor, CLOCK_SKEW_MS, BACKDATE_LIMIT_MS, readingAt, samplesOf, type ActionContext } from './coats'
import { JobError, loadRevisions, revisionLabel, type RevisionInfo } from './jobs'
import type { Actor } from './pairing'

// Mixes: a painter logs a cup of mixed product (revision, reducer grade, amount, time) and closes it
// when it is used or thrown away. The reducer is checked against the data sheet's band for the booth
// temperature when the mix was made; what did not match is kept in mixes.warnings.

const r1 = (v: number) => Math.round(v * 10) / 10

/** Warnings about a mix: reducer against the TDS band at the booth temperature, missing pot life (pure). */
export function mixWarnings(revision: RevisionInfo, airTempC: number | null, grade: string | null): { advised: string | null; warnings: string[] } {
  const bands = reducerBands(revision.fields)
  const warnings: string[] = []
  let advised: string | null = null
  if (bands.length) {
    if (airTempC === null) warnings.push('No current booth air temperature: the reducer could not be checked against the data sheet.')
    else {
      advised = reducerAdvice(bands, airTempC)
      const check = reducerCheck(bands, airTempC, grade)
      if (check.status === 'mismatch') warnings.push(`${check.message} (booth ${r1(airTempC)} °C)`)
      else if (check.status === 'no-grade-logged') warnings.push(check.message)
      else if (check.status === 'no-advice') warnings.push(`No reducer band of the data sheet covers ${r1(airTempC)} °C.`)
    }
  }
  if (revision.product.components === 2 && !toPotLifeSpec(revision.product, revision.fields)) {
    warnings.push('The data sheet revision gives no pot life for this 2K product.')
  }
  return { advised, warnings }
}

export interface MixActionResult {
  mix: Mix
  actor: Actor
  boothId: number
}

export async function logMix(db: Kysely<Database>, ctx: ActionContext, input: z.output<typeof LogMixSchema>): Promise<MixActionResult> {
  const now = ctx.now ?? new Date()
  const actor = await actorFor(db, ctx, input, async () => input.boothId)
  if (!(await findBooth(db, input.boothId))) throw new JobError(404, 'No such booth')
  const mixedAt = input.mixedAt ? new Date(input.mixedAt) : now
  if (mixedAt.getTime() > now.getTime() + CLOCK_SKEW_MS || mixedAt.getTime() < now.getTime() - BACKDATE_LIMIT_MS) {
    throw new JobError(400, 'The mixing time must be within the last 12 hours', [{ path: 'mixedAt', message: 'Within the last 12 hours' }])
  }
  const revision = (await loadRevisions(db, [input.revisionId])).get(input.revisionId)
  if (!revision) throw new JobError(400, 'Choose a product revision from the spec sheets', [{ path: 'revisionId', message: 'Unknown revision' }])
  if (input.jobId) {
    const job = await findJob(db, input.jobId)
    if (!job) throw new JobError(400, 'No such job', [{ path: 'jobId', message: 'Unknown job' }])
    if (job.booth_id !== input.boothId) throw new JobError(400, `Job ${job.number} is not in this booth`, [{ path: 'jobId', message: 'Another booth' }])
    if (input.stepId && !(await listSteps(db, job.id)).some((s) => s.id === input.stepId)) {
      throw new JobError(400, 'That step is not part of the job', [{ path: 'stepId', message: 'Not in this job' }])
    }
  } else if (input.stepId) {
    throw new JobError(400, 'A step needs its job', [{ path: 'jobId', message: 'Choose the job' }])
  }
  const samples = await samplesOf(db, input.boothId, mixedAt.getTime(), mixedAt.getTime())
  const airTempC = readingAt(samples, mixedAt.getTime()).airTempC
  const grade = input.reducerGrade ? input.reducerGrade : null
  const { advised, warnings } = mixWarnings(revision, airTempC, grade)

  return db.transaction().execute(async (tx) => {
    const mix = await insertMix(tx, {
      boothId: input.boothId,
      jobId: input.jobId ?? null,
      stepId: input.stepId ?? null,
      revisionId: revision.id,
      reducerGrade: grade,
      amountMl: input.amountMl ?? null,
      painterId: actor.id,
      mixedAt,
      airTempC,
      reducerAdvised: advised,
      warnings,
    })
    await freezeRevision(tx, revision.id)
    await appendEvent(tx, {
      type: 'mix.logged',
      actor: actorOf(actor),
      subject: { type: 'booth', id: input.boothId },
      at: now,
      data: {
        mixId: mix.id,
        jobId: mix.job_id,
        stepId: mix.step_id,
        revisionId: revision.id,
        product: revisionLabel(revision),
        reducerGrade: grade,
        reducerAdvised: advised,
        amountMl: mix.amount_ml,
        airTempC,
        mixedAt: mixedAt.toISOString(),
        warnings,
        via: actor.via,
      },
    })
    return { mix, actor, boothId: input.boothId }
  })
}

/** Closes an open mix as used or discarded, recording how much of its pot life it had used. */
export async function closeMix(db: Kysely<Database>, ctx: ActionContext, mixId: number, input: z.output<typeof CloseMixSchema>): Promise<MixActionResult> {
  const now = ctx.now ?? new Date()
  const actor = await actorFor(db, ctx, input, async () => {
    const mix = await findMix(db, mixId)
    if (!mix) throw new JobError(404, 'No such mix')
    return mix.booth_id
  })
  const pre = await findMix(db, mixId)
  if (!pre) throw new JobError(404, 'No such mix')
  if (pre.closed_at) throw new JobError(409, 'This mix is already closed')
  const revision = (await loadRevisions(db, [pre.revision_id])).get(pre.revision_id)
  const spec = revision ? toPotLifeSpec(revision.product, revision.fields) : null
  let usedFraction: number | null = null
  if (spec) {
    const samples = await samplesOf(db, pre.booth_id, pre.mixed_at.getTime(), now.getTime())
    const r = potLife(spec, samples, pre.mixed_at.getTime(), Math.max(now.getTime(), pre.mixed_at.getTime()))
    usedFraction = Number.isFinite(r.usedFraction) ? Math.round(r.usedFraction * 1000) / 1000 : null
  }
  return db.transaction().execute(async (tx) => {
    const mix = await closeMixRow(tx, mixId, now, input.outcome, actor.id)
    if (!mix) throw new JobError(409, 'This mix is already closed')
    await appendEvent(tx, {
      type: 'mix.closed',
      actor: actorOf(actor),
      subject: { type: 'booth', id: mix.booth_id },
      at: now,
      data: { mixId, outcome: input.outcome, potLifeUsed: usedFraction, closedAt: now.toISOString(), via: actor.via },
    })
    return { mix, actor, boothId: mix.booth_id }
  })
}
