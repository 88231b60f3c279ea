import { createHash } from 'node:crypto'
import { createError } from 'h3'
import type { Kysely } from 'kysely'
import {
  revisionContextIssues,
  revisionIssuesSI,
  TDS_MAX_BYTES,
  type FieldIssue,
  type ProductInput,
  type ProductPatch,
  type SpecRevisionFields,
} from '#shared/schemas/spec'
import { looksLikePdf, sanitizeFileName } from '#shared/specs/file-name'
import type { Database } from '../db/database'
import { findFile, insertFileIfAbsent, openBlob, storeBlob, type StoredFile } from '../repositories/files'
import {
  countFrozenRevisions,
  countRevisions,
  findProduct,
  findProductByName,
  findRevision,
  findRevisionWithProduct,
  freezeRevision,
  insertProduct,
  insertRevision,
  listProductsWithLatest,
  listRevisions,
  lockProduct,
  lockRevision,
  setRevisionTds,
  updateProductRow,
  updateRevisionFields,
  type Product,
  type ProductListItem,
  type SpecRevision,
} from '../repositories/specs'
import { asHttpError } from '../utils/domain-errors'
import { actorOf, appendEvent, recorded } from './event-log'

// Spec sheet rules that are not about HTTP: products, numbered revisions (a frozen revision is never
// changed: editing it makes the next revision), and TDS uploads.

export interface Actor {
  id: number
  name: string
  role: string
}

export class SpecError extends Error {
  constructor(
    readonly statusCode: number,
    message: string,
    readonly issues?: FieldIssue[],
  ) {
    super(message)
  }
}

/** Route helper: a SpecError with field issues becomes our 400 body with `issues`; anything else as asHttpError. */
export function specHttpError(e: unknown): never {
  if (e instanceof SpecError && e.issues?.length) {
    throw createError({ statusCode: e.statusCode, message: e.message, data: { issues: e.issues } })
  }
  return asHttpError(e)
}

const productSubject = (id: number) => ({ type: 'product', id })
const revisionSubject = (id: number) => ({ type: 'spec_revision', id })

// ── products ────────────────────────────────────────────────────────────────────────────────────

export function listProducts(db: Kysely<Database>): Promise<ProductListItem[]> {
  return listProductsWithLatest(db)
}

export async function getProduct(db: Kysely<Database>, id: number): Promise<{ product: Product; revisions: SpecRevision[] }> {
  const product = await findProduct(db, id)
  if (!product) throw new SpecError(404, 'No such product')
  return { product, revisions: await listRevisions(db, id) }
}

export async function getRevisions(db: Kysely<Database>, productId: number): Promise<SpecRevision[]> {
  if (!(await findProduct(db, productId))) throw new SpecError(404, 'No such product')
  return listRevisions(db, productId)
}

export async function createProduct(db: Kysely<Database>, user: Actor, input: ProductInput): Promise<Product> {
  if (await findProductByName(db, input.name)) throw new SpecError(409, 'A product with this name already exists')
  return recorded(
    db,
    (tx) =>
      insertProduct(tx, {
        name: input.name,
        category: input.category,
        chemistry: input.chemistry,
        components: input.components,
        notes: input.notes,
        created_by: user.id,
      }),
    (p) => ({
      type: 'spec.product.created',
      actor: actorOf(user),
      subject: productSubject(p.id),
      data: { productId: p.id, name: p.name, category: p.category, chemistry: p.chemistry, components: p.components },
    }),
  ).catch(uniqueName)
}

function uniqueName(e: unknown): never {
  if (e && typeof e === 'object' && 'code' in e && e.code === '23505') throw new SpecError(409, 'A product with this name already exists')
  throw e
}

/**
 * Name, category and notes may change at any time. Chemistry and components decide what every revision
 * means, so they may change only while the product has no revision yet.
 */
export async function updateProduct(db: Kysely<Database>, user: Actor, id: number, patch: ProductPatch): Promise<Product> {
  return recorded(
    db,
    async (tx) => {
      const current = await lockProduct(tx, id)
      if (!current) throw new SpecError(404, 'No such product')
      const engineChange =
        (patch.chemistry !== undefined && patch.chemistry !== current.chemistry) || (patch.components !== undefined && patch.components !== current.components)
      if (engineChange && (await countRevisions(tx, id)) > 0) {
        throw new SpecError(409, 'Chemistry and components cannot change once the product has revisions: create a new product instead')
      }
      if (patch.name !== undefined) {
        const same = await findProductByName(tx, patch.name)
        if (same && same.id !== id) throw new SpecError(409, 'A product with this name already exists')
      }
      const updated = await updateProductRow(tx, id, {
        ...(patch.name !== undefined && { name: patch.name }),
        ...(patch.category !== undefined && { category: patch.category }),
        ...(patch.chemistry !== undefined && { chemistry: patch.chemistry }),
        ...(patch.components !== undefined && { components: patch.components }),
        ...(patch.notes !== undefined && { notes: patch.notes }),
      })
      return { before: current, after: updated! }
    },
    ({ before, after }) => ({
      type: 'spec.product.updated',
      actor: actorOf(user),
      subject: productSubject(after.id),
      data: { productId: after.id, changes: changedFields(before, after, ['name', 'category', 'chemistry', 'components', 'notes']) },
    }),
  )
    .then((r) => r.after)
    .catch(uniqueName)
}

function changedFields<T extends object>(before: T, after: T, keys: readonly (keyof T)[]): string[] {
  return keys.filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k])).map(String)
}

// ── revisions ───────────────────────────────────────────────────────────────────────────────────

function assertValidFor(product: Product, fields: SpecRevisionFields): void {
  const issues = [...revisionIssuesSI(fields), ...revisionContextIssues(product, fields)]
  if (issues.length) throw new SpecError(400, 'Some fields need attention', issues)
}

export async function getRevision(db: Kysely<Database>, id: number): Promise<{ revision: SpecRevision; product: Product }> {
  const r = await findRevisionWithProduct(db, id)
  if (!r) throw new SpecError(404, 'No such spec revision')
  return r
}

/** Adds the next revision of a product (number = highest + 1), as a draft. */
export async function createRevision(db: Kysely<Database>, user: Actor, productId: number, fields: SpecRevisionFields): Promise<SpecRevision> {
  return recorded(
    db,
    async (tx) => {
      const product = await lockProduct(tx, productId)
      if (!product) throw new SpecError(404, 'No such product')
      assertValidFor(product, fields)
      return insertRevision(tx, productId, fields, { userId: user.id })
    },
    (r) => ({
      type: 'spec.revision.created',
      actor: actorOf(user),
      subject: revisionSubject(r.id),
      data: { revisionId: r.id, productId: r.productId, number: r.number, fromRevisionId: null },
    }),
  )
}

export interface EditResult {
  revision: SpecRevision
  /** True when the edited revision was frozen and this edit made the next revision. */
  created: boolean
  /** The revision the edit was made to. */
  fromRevisionId: number
}

/**
 * Applies changes to a revision. A draft is updated in place (`spec.revision.updated`). A frozen
 * revision stays as it is: its copy with the changes becomes the product's next revision
 * (`spec.revision.created`, with fromRevisionId), carrying over the data sheet.
 */
export async function editRevision(db: Kysely<Database>, user: Actor, revisionId: number, changes: Partial<SpecRevisionFields>): Promise<EditResult> {
  return db.transaction().execute(async (tx) => {
    const locked = await lockRevision(tx, revisionId)
    if (!locked) throw new SpecError(404, 'No such spec revision')
    const product = await findProduct(tx, locked.product_id)
    const current = await findRevision(tx, revisionId)
    if (!product || !current) throw new SpecError(404, 'No such spec revision')
    const merged = snapToCurrent(pickFields(current), { ...pickFields(current), ...changes })
    assertValidFor(product, merged)
    const changed = changedFields(pickFields(current), merged, Object.keys(merged) as (keyof SpecRevisionFields)[])

    if (locked.frozen_at === null) {
      if (!changed.length) return { revision: current, created: false, fromRevisionId: revisionId }
      const revision = await updateRevisionFields(tx, revisionId, merged, user.id)
      await appendEvent(tx, {
        type: 'spec.revision.updated',
        actor: actorOf(user),
        subject: revisionSubject(revisionId),
        data: { revisionId, productId: revision.productId, number: revision.number, changed },
      })
      return { revision, created: false, fromRevisionId: revisionId }
    }
    // Nothing differs: no copy of a frozen revision is made.
    if (!changed.length) return { revision: current, created: false, fromRevisionId: revisionId }
    const revision = await insertRevision(tx, product.id, merged, { userId: user.id, tdsSha256: locked.tds_sha256 })
    await appendEvent(tx, {
      type: 'spec.revision.created',
      actor: actorOf(user),
      subject: revisionSubject(revision.id),
      data: { revisionId: revision.id, productId: product.id, number: revision.number, fromRevisionId: revisionId, changed },
    })
    return { revision, created: true, fromRevisionId: revisionId }
  })
}

/** Freezes a revision on request (e.g. to publish it before the first job uses it). Idempotent. */
export async function freezeRevisionBy(db: Kysely<Database>, user: Actor, revisionId: number): Promise<{ revision: SpecRevision; newlyFrozen: boolean }> {
  const r = await db.transaction().execute((tx) => freezeRevision(tx, revisionId, { actor: actorOf(user), usedBy: { type: 'request', id: user.id } }))
  if (!r) throw new SpecError(404, 'No such spec revision')
  return r
}

/**
 * Numbers within SAME_WITHIN of the stored value keep the stored value: a form that shows °C values in °F
 * with two decimals sends them back a few thousandths of a degree off, and that is no change (a frozen
 * revision must not get a new revision for it).
 */
export const SAME_WITHIN = 0.005
export function snapToCurrent<T>(current: T, next: T): T {
  if (typeof current === 'number' && typeof next === 'number') return (Math.abs(current - next) <= SAME_WITHIN ? current : next) as T
  if (Array.isArray(current) && Array.isArray(next)) {
    return (current.length === next.length ? next.map((v: unknown, i) => snapToCurrent(current[i], v)) : next) as T
  }
  if (current && next && typeof current === 'object' && typeof next === 'object') {
    const out: Record<string, unknown> = { ...(next as Record<string, unknown>) }
    for (const k of Object.keys(out)) out[k] = snapToCurrent((current as Record<string, unknown>)[k], out[k])
    return out as T
  }
  return next
}

/** Only the SpecRevisionFields of a revision (drops id, number, dates, file). */
export function pickFields(r: SpecRevisionFields): SpecRevisionFields {
  return {
    refTempC: r.refTempC,
    flashMinMinutes: r.flashMinMinutes,
    flashMaxMinutes: r.flashMaxMinutes,
    flashBeforeNextMinutes: r.flashBeforeNextMinutes,
    recoatWindowMinutes: r.recoatWindowMinutes,
    coats: r.coats,
    potLifeMinutes: r.potLifeMinutes,
    mixRatio: r.mixRatio,
    reducerBands: r.reducerBands,
    minAirTempC: r.minAirTempC,
    maxAirTempC: r.maxAirTempC,
    minRhPct: r.minRhPct,
    maxRhPct: r.maxRhPct,
    dustFreeMinutes: r.dustFreeMinutes,
    handleMinutes: r.handleMinutes,
    sandPolishMinutes: r.sandPolishMinutes,
    bakeSchedules: r.bakeSchedules,
    minCureTempC: r.minCureTempC,
    q10: r.q10,
    flashTable: r.flashTable,
    wbRefRhPct: r.wbRefRhPct,
    wbRefAirflowMps: r.wbRefAirflowMps,
    wbAirflowExponent: r.wbAirflowExponent,
  }
}

// ── data sheets (TDS PDFs) ──────────────────────────────────────────────────────────────────────

export interface Upload {
  data: Uint8Array
  filename?: string
}

/**
 * Attaches a TDS PDF to a revision: the bytes must start with "%PDF-" and be at most TDS_MAX_BYTES; they
 * are stored once by SHA-256 under uploadDir. A draft may get a new data sheet at any time; a frozen
 * revision only when it has none yet (replacing it means editing, i.e. a new revision).
 */
export async function attachTds(
  db: Kysely<Database>,
  user: Actor,
  revisionId: number,
  upload: Upload,
  uploadDir: string,
): Promise<{ revision: SpecRevision; file: StoredFile }> {
  if (!upload.data.byteLength) throw new SpecError(400, 'The file is empty')
  if (upload.data.byteLength > TDS_MAX_BYTES) throw new SpecError(413, `The file is larger than ${TDS_MAX_BYTES / 1024 / 1024} MB`)
  if (!looksLikePdf(upload.data)) throw new SpecError(415, 'This is not a PDF file: its content does not start with %PDF-')
  const name = sanitizeFileName(upload.filename)
  const sha256 = createHash('sha256').update(upload.data).digest('hex')

  const existing = await findRevision(db, revisionId)
  if (!existing) throw new SpecError(404, 'No such spec revision')
  if (existing.frozenAt && existing.tds) {
    throw new SpecError(409, 'This revision is in use and already has a data sheet: edit it to make a new revision with the new one')
  }
  await storeBlob(uploadDir, sha256, upload.data)

  return db.transaction().execute(async (tx) => {
    const locked = await lockRevision(tx, revisionId)
    if (!locked) throw new SpecError(404, 'No such spec revision')
    if (locked.frozen_at && locked.tds_sha256) {
      throw new SpecError(409, 'This revision is in use and already has a data sheet: edit it to make a new revision with the new one')
    }
    const { file } = await insertFileIfAbsent(tx, {
      sha256,
      size_bytes: upload.data.byteLength,
      content_type: 'application/pdf',
      original_name: name,
      uploaded_by: user.id,
    })
    const revision = await setRevisionTds(tx, revisionId, sha256, user.id)
    await appendEvent(tx, {
      type: 'spec.tds.attached',
      actor: actorOf(user),
      subject: revisionSubject(revisionId),
      data: { revisionId, productId: revision.productId, number: revision.number, sha256, sizeBytes: upload.data.byteLength, name, replaced: locked.tds_sha256 },
    })
    return { revision, file }
  })
}

/** A stored file for download: its metadata and a read stream. */
export async function openTds(db: Kysely<Database>, sha256: string, uploadDir: string) {
  const file = await findFile(db, sha256)
  if (!file) throw new SpecError(404, 'No such file')
  const blob = await openBlob(uploadDir, sha256)
  if (!blob) throw new SpecError(404, 'The file is missing from storage')
  return { file, ...blob }
}

export type { Product, ProductListItem, SpecRevision }
