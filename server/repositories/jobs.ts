import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import type { Job, JobStatus, JobStep, NewJob } from '../db/tables/jobs'
import type { ProductEngineFields, SpecRevisionFields } from '#shared/schemas/spec'
import { columnsToFields } from './specs'

type Db = Kysely<Database>

export interface JobFilter {
  status?: JobStatus | 'active'
  boothId?: number
}

export function listJobs(db: Db, f: JobFilter = {}): Promise<Job[]> {
  let q = db.selectFrom('jobs').selectAll()
  if (f.status === 'active') q = q.where('status', '!=', 'done')
  else if (f.status) q = q.where('status', '=', f.status)
  if (f.boothId) q = q.where('booth_id', '=', f.boothId)
  return q.orderBy('updated_at', 'desc').orderBy('id', 'desc').limit(500).execute()
}

export function findJob(db: Db, id: number): Promise<Job | undefined> {
  return db.selectFrom('jobs').selectAll().where('id', '=', id).executeTakeFirst()
}

/** Locks the job row for the rest of the transaction (coat start / finish serialise per job). */
export function lockJob(db: Db, id: number): Promise<Job | undefined> {
  return db.selectFrom('jobs').selectAll().where('id', '=', id).forUpdate().executeTakeFirst()
}

export function findJobByNumber(db: Db, number: string): Promise<Job | undefined> {
  return db.selectFrom('jobs').selectAll().where('number', '=', number).executeTakeFirst()
}

export function insertJob(db: Db, job: NewJob): Promise<Job> {
  return db.insertInto('jobs').values(job).returningAll().executeTakeFirstOrThrow()
}

export interface JobChanges {
  number?: string
  vehicle?: string
  colourCode?: string
  panels?: string[]
  notes?: string
  painterId?: number | null
  boothId?: number | null
  status?: JobStatus
}

export function updateJob(db: Db, id: number, c: JobChanges): Promise<Job | undefined> {
  return db
    .updateTable('jobs')
    .set({
      ...(c.number !== undefined && { number: c.number }),
      ...(c.vehicle !== undefined && { vehicle: c.vehicle }),
      ...(c.colourCode !== undefined && { colour_code: c.colourCode }),
      ...(c.panels !== undefined && { panels: c.panels }),
      ...(c.notes !== undefined && { notes: c.notes }),
      ...(c.painterId !== undefined && { painter_id: c.painterId }),
      ...(c.boothId !== undefined && { booth_id: c.boothId }),
      ...(c.status !== undefined && { status: c.status }),
      updated_at: new Date(),
    })
    .where('id', '=', id)
    .returningAll()
    .executeTakeFirst()
}

export function listSteps(db: Db, jobId: number): Promise<JobStep[]> {
  return db.selectFrom('job_steps').selectAll().where('job_id', '=', jobId).orderBy('position').execute()
}

export function listStepsOfJobs(db: Db, jobIds: number[]): Promise<JobStep[]> {
  if (!jobIds.length) return Promise.resolve([])
  return db.selectFrom('job_steps').selectAll().where('job_id', 'in', jobIds).orderBy('job_id').orderBy('position').execute()
}

export interface StepValues {
  revisionId: number
  coatsPlanned: number
  note: string
}

/**
 * Writes the finish plan in order: kept steps are updated in place (their coats stay attached),
 * new ones inserted, the rest deleted. Positions are moved out of the way first so the
 * (job_id, position) uniqueness holds at every statement.
 */
export async function replaceSteps(db: Db, jobId: number, steps: (StepValues & { id?: number })[], removeIds: number[]): Promise<JobStep[]> {
  if (removeIds.length) await db.deleteFrom('job_steps').where('job_id', '=', jobId).where('id', 'in', removeIds).execute()
  await db
    .updateTable('job_steps')
    .set((eb) => ({ position: eb('position', '+', 1000) }))
    .where('job_id', '=', jobId)
    .execute()
  for (const [i, s] of steps.entries()) {
    const values = { position: i + 1, revision_id: s.revisionId, coats_planned: s.coatsPlanned, note: s.note }
    if (s.id) await db.updateTable('job_steps').set(values).where('id', '=', s.id).where('job_id', '=', jobId).execute()
    else await db.insertInto('job_steps').values({ ...values, job_id: jobId }).execute()
  }
  return listSteps(db, jobId)
}

/** The jobs a booth may be working on (not done), oldest first. */
export function listOpenJobsOfBooth(db: Db, boothId: number): Promise<Job[]> {
  return db.selectFrom('jobs').selectAll().where('booth_id', '=', boothId).where('status', '!=', 'done').orderBy('created_at').orderBy('id').execute()
}

/** A booth with its site's display units (the booth screen shows the shop's units). */
export function boothWithUnits(db: Db, boothId: number) {
  return db
    .selectFrom('booths')
    .innerJoin('sites', 'sites.id', 'booths.site_id')
    .select(['booths.id', 'booths.name', 'booths.kind', 'booths.has_heater', 'sites.units'])
    .where('booths.id', '=', boothId)
    .executeTakeFirst()
}

// ── spec revisions, as job steps, coats and mixes use them (read only) ─────────────────────────

export interface RevisionRow {
  id: number
  number: number
  productId: number
  productName: string
  category: string
  product: ProductEngineFields
  fields: SpecRevisionFields
  frozen: boolean
}

function revisionsWithProduct(db: Db) {
  return db
    .selectFrom('spec_revisions as r')
    .innerJoin('products as p', 'p.id', 'r.product_id')
    .selectAll('r')
    .select(['p.name as product_name', 'p.category as product_category', 'p.chemistry as product_chemistry', 'p.components as product_components'])
}

type RevisionJoin = Awaited<ReturnType<ReturnType<typeof revisionsWithProduct>['executeTakeFirstOrThrow']>>

function toRevisionRow(r: RevisionJoin): RevisionRow {
  return {
    id: r.id,
    number: r.number,
    productId: r.product_id,
    productName: r.product_name,
    category: r.product_category,
    product: { chemistry: r.product_chemistry, components: Number(r.product_components) === 2 ? 2 : 1 },
    fields: columnsToFields(r),
    frozen: r.frozen_at !== null,
  }
}

/** Revisions with their product, in one query (a screen recomputes often). */
export async function findRevisionsWithProduct(db: Db, ids: number[]): Promise<RevisionRow[]> {
  if (!ids.length) return []
  return (await revisionsWithProduct(db).where('r.id', 'in', ids).execute()).map(toRevisionRow)
}

/** Every revision with its product, products by name, newest revision first (the plan editor's choices). */
export async function listRevisionChoices(db: Db): Promise<RevisionRow[]> {
  return (await revisionsWithProduct(db).orderBy('p.name').orderBy('r.number', 'desc').execute()).map(toRevisionRow)
}

/** The newest revision of each named product (demo seed). */
export async function latestRevisionIdsByProductName(db: Db, names: string[]): Promise<Map<string, number>> {
  if (!names.length) return new Map()
  const rows = await db
    .selectFrom('spec_revisions as r')
    .innerJoin('products as p', 'p.id', 'r.product_id')
    .select(['p.name', 'r.id'])
    .where('p.name', 'in', names)
    .orderBy('p.name')
    .orderBy('r.number', 'desc')
    .execute()
  const out = new Map<string, number>()
  for (const r of rows) if (!out.has(r.name)) out.set(r.name, r.id)
  return out
}
