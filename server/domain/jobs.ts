import type { Kysely, Transaction } from 'kysely'
import type { Database, User } from '../db/database'
import type { Coat, Job, JobStatus, JobStep, Mix } from '../db/tables/jobs'
import type { CreateJobInput, FinishStepInput, UpdateJobInput } from '#shared/schemas/jobs'
import { CreateJobSchema, FinishPlanSchema, UpdateJobSchema } from '#shared/schemas/jobs'
import { appendEvent, actorOf } from './event-log'
import { findBooth, listBooths } from '../repositories/booths'
import { listCoatsOfJob, countCoatsOfSteps, findOpenCoatOfBooth } from '../repositories/coats'
import {
  findJob,
  findJobByNumber,
  findRevisionsWithProduct,
  insertJob,
  listJobs,
  listRevisionChoices,
  listSteps,
  listStepsOfJobs,
  replaceSteps,
  updateJob,
  type JobFilter,
  type RevisionRow,
} from '../repositories/jobs'
import { listMixesOfJob } from '../repositories/mixes'
import { findUserById, listUsers } from '../repositories/users'
import { asHttpError } from '../utils/domain-errors'
import { validationError, type FieldIssue } from '../utils/validate'
import { ACTOR_ROLES, ScreenError } from './pairing'

// Repair orders and their finish plans: who may change what, and the view the jobs pages read.

export class JobError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
    readonly issues: FieldIssue[] = [],
  ) {
    super(message)
  }
}

/** Domain errors → HTTP errors (with field issues when there are some); anything else is rethrown as is. */
export function toHttpError(e: unknown): never {
  if (e instanceof JobError && e.issues.length) throw Object.assign(validationError(e.issues, e.message), { statusCode: e.statusCode })
  if (e instanceof JobError || e instanceof ScreenError) asHttpError(e)
  throw e
}

type Db = Kysely<Database> | Transaction<Database>
type Who = { id: number; name: string; role: string }

// ── spec revisions as the jobs code sees them ───────────────────────────────────────────────────

export type RevisionInfo = RevisionRow

export async function loadRevisions(db: Db, ids: number[]): Promise<Map<number, RevisionInfo>> {
  const unique = [...new Set(ids)]
  if (!unique.length) return new Map()
  const rows = await findRevisionsWithProduct(db, unique)
  return new Map(rows.map((r) => [r.id, r]))
}

export const revisionLabel = (r: RevisionInfo | undefined) => (r ? `${r.productName} (rev. ${r.number})` : 'unknown product')

export function revisionSummary(r: RevisionInfo | undefined) {
  if (!r) return null
  return {
    id: r.id,
    number: r.number,
    productId: r.productId,
    productName: r.productName,
    category: r.category,
    chemistry: r.product.chemistry,
    components: r.product.components,
    coats: r.fields.coats,
    flashMinMinutes: r.fields.flashMinMinutes,
    flashMaxMinutes: r.fields.flashMaxMinutes,
    flashBeforeNextMinutes: r.fields.flashBeforeNextMinutes,
    potLifeMinutes: r.fields.potLifeMinutes,
    mixRatio: r.fields.mixRatio,
    frozen: r.frozen,
  }
}

// ── jobs ────────────────────────────────────────────────────────────────────────────────────────

async function checkPeople(db: Db, v: { painterId?: number | null; boothId?: number | null }): Promise<FieldIssue[]> {
  const issues: FieldIssue[] = []
  if (v.painterId) {
    const u = await findUserById(db, v.painterId)
    if (!u || u.disabled_at || !ACTOR_ROLES.includes(u.role)) issues.push({ path: 'painterId', message: 'Choose an active painter' })
  }
  if (v.boothId && !(await findBooth(db, v.boothId))) issues.push({ path: 'boothId', message: 'Choose a booth of the shop' })
  return issues
}

async function checkSteps(db: Db, steps: { revisionId: number }[]): Promise<FieldIssue[]> {
  const revs = await loadRevisions(db, steps.map((s) => s.revisionId))
  return steps.flatMap((s, i) => (revs.has(s.revisionId) ? [] : [{ path: `steps.${i}.revisionId`, message: 'Choose a product revision from the spec sheets' }]))
}

export async function createJob(db: Kysely<Database>, by: Who, input: CreateJobInput): Promise<Job> {
  const v = CreateJobSchema.parse(input)
  const issues = [...(await checkPeople(db, v)), ...(await checkSteps(db, v.steps))]
  if (issues.length) throw new JobError(400, 'Some fields need attention', issues)
  if (await findJobByNumber(db, v.number)) throw new JobError(409, `Repair order ${v.number} already exists`, [{ path: 'number', message: 'This repair order number is taken' }])
  return db.transaction().execute(async (tx) => {
    const job = await insertJob(tx, {
      number: v.number,
      vehicle: v.vehicle,
      colour_code: v.colourCode,
      panels: v.panels,
      notes: v.notes,
      painter_id: v.painterId ?? null,
      booth_id: v.boothId ?? null,
      created_by: by.id,
    })
    const steps = await replaceSteps(tx, job.id, v.steps.map((s) => ({ ...s, note: s.note ?? '' })), [])
    await appendEvent(tx, {
      type: 'job.created',
      actor: actorOf(by),
      subject: { type: 'job', id: job.id },
      data: { number: job.number, vehicle: job.vehicle, colourCode: job.colour_code, boothId: job.booth_id, painterId: job.painter_id, steps: steps.map(stepData) },
    })
    return job
  })
}

const stepData = (s: JobStep) => ({ id: s.id, position: s.position, revisionId: s.revision_id, coatsPlanned: s.coats_planned })

export async function changeJob(db: Kysely<Database>, by: Who, jobId: number, input: UpdateJobInput): Promise<Job> {
  const v = UpdateJobSchema.parse(input)
  const job = await findJob(db, jobId)
  if (!job) throw new JobError(404, 'No such job')
  const issues = await checkPeople(db, v)
  if (issues.length) throw new JobError(400, 'Some fields need attention', issues)
  if (v.number && v.number !== job.number && (await findJobByNumber(db, v.number))) {
    throw new JobError(409, `Repair order ${v.number} already exists`, [{ path: 'number', message: 'This repair order number is taken' }])
  }
  const coats = await listCoatsOfJob(db, jobId)
  const open = coats.find((c) => c.finished_at === null)
  if (open && ((v.boothId !== undefined && v.boothId !== job.booth_id) || (v.status !== undefined && v.status !== job.status))) {
    throw new JobError(409, 'A coat is being sprayed on this job: finish it before moving the job or changing its status')
  }
  if (v.status === 'planned' && coats.length) throw new JobError(409, 'Coats are recorded on this job: it cannot go back to planned')
  const changes = Object.fromEntries(Object.entries(v).filter(([, x]) => x !== undefined)) as UpdateJobInput
  return db.transaction().execute(async (tx) => {
    const updated = await updateJob(tx, jobId, changes as Parameters<typeof updateJob>[2])
    if (!updated) throw new JobError(404, 'No such job')
    await appendEvent(tx, {
      type: v.status && v.status !== job.status ? 'job.status_changed' : 'job.updated',
      actor: actorOf(by),
      subject: { type: 'job', id: jobId },
      data: { number: updated.number, changes, ...(v.status && { from: job.status, to: v.status }) },
    })
    return updated
  })
}

/**
 * Replaces the finish plan. Steps that already have coats keep their place at the front, their
 * product revision, and at least as many coats as were sprayed; the others may change freely.
 */
export async function changeFinishPlan(db: Kysely<Database>, by: Who, jobId: number, input: { steps: FinishStepInput[] }): Promise<JobStep[]> {
  const v = FinishPlanSchema.parse(input)
  return db.transaction().execute(async (tx) => {
    const job = await findJob(tx, jobId)
    if (!job) throw new JobError(404, 'No such job')
    if (job.status === 'done') throw new JobError(409, 'This job is done: its finish plan is closed')
    const before = await listSteps(tx, jobId)
    const counts = new Map((await countCoatsOfSteps(tx, before.map((s) => s.id))).map((c) => [c.step_id, c.n]))
    const coated = before.filter((s) => (counts.get(s.id) ?? 0) > 0)
    const issues: FieldIssue[] = [...(await checkSteps(tx, v.steps))]
    v.steps.forEach((s, i) => {
      if (s.id && !before.some((b) => b.id === s.id)) issues.push({ path: `steps.${i}.id`, message: 'This step is not part of the job' })
    })
    coated.forEach((c, i) => {
      const at = v.steps.findIndex((s) => s.id === c.id)
      const n = counts.get(c.id) ?? 0
      if (at < 0) issues.push({ path: 'steps', message: `Step ${c.position} has coats recorded and cannot be removed` })
      else {
        const s = v.steps[at]!
        if (at !== i) issues.push({ path: `steps.${at}`, message: 'Steps with coats recorded keep their place at the start of the plan' })
        if (s.revisionId !== c.revision_id) issues.push({ path: `steps.${at}.revisionId`, message: 'Coats were sprayed with this revision: it cannot change' })
        if (s.coatsPlanned < n) issues.push({ path: `steps.${at}.coatsPlanned`, message: `${n} coats are already recorded` })
      }
    })
    if (issues.length) throw new JobError(400, 'The finish plan needs attention', issues)
    const keep = new Set(v.steps.map((s) => s.id).filter((x): x is number => !!x))
    const steps = await replaceSteps(
      tx,
      jobId,
      v.steps.map((s) => ({ id: s.id, revisionId: s.revisionId, coatsPlanned: s.coatsPlanned, note: s.note ?? '' })),
      before.filter((b) => !keep.has(b.id)).map((b) => b.id),
    )
    // More coats planned on a curing job: it goes back into the booth.
    const remaining = steps.some((s) => (counts.get(s.id) ?? 0) < s.coats_planned)
    if (job.status === 'curing' && remaining) await updateJob(tx, jobId, { status: 'in_booth' })
    await appendEvent(tx, {
      type: 'job.plan_changed',
      actor: actorOf(by),
      subject: { type: 'job', id: jobId },
      data: { number: job.number, before: before.map(stepData), after: steps.map(stepData) },
    })
    return steps
  })
}

// ── views ───────────────────────────────────────────────────────────────────────────────────────

const person = (users: Map<number, User>, id: number | null) => {
  const u = id === null ? undefined : users.get(id)
  return u ? { id: u.id, name: u.name } : null
}

export async function jobList(db: Kysely<Database>, f: JobFilter) {
  const [jobs, users, booths] = await Promise.all([listJobs(db, f), listUsers(db), listBooths(db)])
  const steps = await listStepsOfJobs(db, jobs.map((j) => j.id))
  const counts = new Map((await countCoatsOfSteps(db, steps.map((s) => s.id))).map((c) => [c.step_id, c.n]))
  const byId = new Map(users.map((u) => [u.id, u]))
  return jobs.map((j) => {
    const own = steps.filter((s) => s.job_id === j.id)
    return {
      ...jobHead(j, byId, booths),
      coatsPlanned: own.reduce((a, s) => a + s.coats_planned, 0),
      coatsDone: own.reduce((a, s) => a + (counts.get(s.id) ?? 0), 0),
      steps: own.length,
    }
  })
}

function jobHead(j: Job, users: Map<number, User>, booths: { id: number; name: string }[]) {
  const booth = booths.find((b) => b.id === j.booth_id)
  return {
    id: j.id,
    number: j.number,
    vehicle: j.vehicle,
    colourCode: j.colour_code,
    panels: j.panels,
    notes: j.notes,
    status: j.status as JobStatus,
    painter: person(users, j.painter_id),
    booth: booth ? { id: booth.id, name: booth.name } : null,
    createdAt: j.created_at.toISOString(),
    updatedAt: j.updated_at.toISOString(),
  }
}

const iso = (d: Date | null) => (d ? d.toISOString() : null)

/** A coat as the job page and the booth screen show it. */
export function coatView(c: Coat, users: Map<number, User>) {
  const check = c.start_check ?? {}
  return {
    id: c.id,
    stepId: c.step_id,
    boothId: c.booth_id,
    coatNumber: c.coat_number,
    painter: person(users, c.painter_id),
    startedAt: c.started_at.toISOString(),
    finishedAt: iso(c.finished_at),
    sprayMinutes: c.finished_at ? Math.round(((c.finished_at.getTime() - c.started_at.getTime()) / 60_000) * 10) / 10 : null,
    overrides: c.overrides,
    flash: check.flash ?? null,
    applicationWindow: check.applicationWindow ?? null,
    condensation: check.condensation ?? null,
  }
}

export function mixView(m: Mix, users: Map<number, User>, revs: Map<number, RevisionInfo>) {
  return {
    id: m.id,
    boothId: m.booth_id,
    jobId: m.job_id,
    stepId: m.step_id,
    revision: revisionSummary(revs.get(m.revision_id)),
    reducerGrade: m.reducer_grade,
    reducerAdvised: m.reducer_advised,
    amountMl: m.amount_ml,
    airTempC: m.air_temp_c,
    painter: person(users, m.painter_id),
    mixedAt: m.mixed_at.toISOString(),
    closedAt: iso(m.closed_at),
    outcome: m.close_outcome,
    warnings: m.warnings,
  }
}

export async function jobDetail(db: Kysely<Database>, jobId: number) {
  const job = await findJob(db, jobId)
  if (!job) throw new JobError(404, 'No such job')
  const [steps, coats, mixes, users, booths] = await Promise.all([listSteps(db, jobId), listCoatsOfJob(db, jobId), listMixesOfJob(db, jobId), listUsers(db), listBooths(db)])
  const revs = await loadRevisions(db, [...steps.map((s) => s.revision_id), ...mixes.map((m) => m.revision_id)])
  const byId = new Map(users.map((u) => [u.id, u]))
  const openCoat = job.booth_id ? await findOpenCoatOfBooth(db, job.booth_id) : undefined
  return {
    job: jobHead(job, byId, booths),
    steps: steps.map((s) => ({
      id: s.id,
      position: s.position,
      revisionId: s.revision_id,
      revision: revisionSummary(revs.get(s.revision_id)),
      coatsPlanned: s.coats_planned,
      coatsDone: coats.filter((c) => c.step_id === s.id).length,
      note: s.note,
    })),
    coats: coats.map((c) => coatView(c, byId)),
    mixes: mixes.map((m) => mixView(m, byId, revs)),
    boothBusy: openCoat && openCoat.job_id !== jobId ? { coatId: openCoat.id, jobId: openCoat.job_id } : null,
  }
}

/** What the job forms choose from: product revisions, painters, booths. */
export async function planOptions(db: Kysely<Database>) {
  const [revisions, users, booths] = await Promise.all([listRevisionChoices(db), listUsers(db), listBooths(db)])
  return {
    revisions: revisions.map((r) => revisionSummary(r)!),
    painters: users
      .filter((u) => !u.disabled_at && ACTOR_ROLES.includes(u.role))
      .sort((a, b) => Number(b.role === 'painter') - Number(a.role === 'painter') || a.name.localeCompare(b.name))
      .map((u) => ({ id: u.id, name: u.name, role: u.role })),
    booths: booths.map((b) => ({ id: b.id, name: b.name, kind: b.kind })),
  }
}
