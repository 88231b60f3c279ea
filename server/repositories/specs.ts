import type { Insertable, Kysely, Selectable, Transaction, Updateable } from 'kysely'
import type { ProductEngineFields, SpecRevisionFields } from '#shared/schemas/spec'
import type { Database } from '../db/database'
import type { ProductsTable, SpecRevisionsTable } from '../db/tables/specs'
import { appendEvent } from '../domain/event-log'

// Kysely access to products and spec revisions. Callers pass the db or a transaction so each action
// and its event commit together. Rows leave here as plain objects with SI fields (SpecRevisionFields).
type Db = Kysely<Database>

export type ProductRow = Selectable<ProductsTable>
export type NewProductRow = Insertable<ProductsTable>

export interface Product extends ProductEngineFields {
  id: number
  name: string
  category: ProductRow['category']
  notes: string
  createdAt: Date
  updatedAt: Date
}

export interface TdsFile {
  sha256: string
  sizeBytes: number
  name: string
  uploadedAt: Date
  /** Where a signed-in user downloads it. */
  url: string
}

export interface SpecRevision extends SpecRevisionFields {
  id: number
  productId: number
  number: number
  /** Set once a coat or mix uses the revision: its values never change after that. */
  frozenAt: Date | null
  tds: TdsFile | null
  createdAt: Date
  createdBy: string | null
  updatedAt: Date
  updatedBy: string | null
}

export interface RevisionSummary {
  id: number
  number: number
  frozenAt: Date | null
  hasTds: boolean
}

export interface ProductListItem extends Product {
  revisionCount: number
  latestRevision: RevisionSummary | null
}

export const fileUrl = (sha256: string) => `/api/files/${sha256}`

function toProduct(r: ProductRow): Product {
  return {
    id: r.id,
    name: r.name,
    category: r.category,
    chemistry: r.chemistry,
    components: Number(r.components) === 2 ? 2 : 1,
    notes: r.notes,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
  }
}

// ── products ────────────────────────────────────────────────────────────────────────────────────

export async function insertProduct(db: Db, row: NewProductRow): Promise<Product> {
  return toProduct(await db.insertInto('products').values(row).returningAll().executeTakeFirstOrThrow())
}

export async function findProduct(db: Db, id: number): Promise<Product | undefined> {
  const r = await db.selectFrom('products').selectAll().where('id', '=', id).executeTakeFirst()
  return r && toProduct(r)
}

/** Same name, case-insensitive (the unique index is on lower(name)). */
export async function findProductByName(db: Db, name: string): Promise<Product | undefined> {
  const r = await db
    .selectFrom('products')
    .selectAll()
    .where((eb) => eb(eb.fn('lower', ['name']), '=', name.trim().toLowerCase()))
    .executeTakeFirst()
  return r && toProduct(r)
}

/** Locks the product row for the rest of the transaction (serialises revision numbering). */
export async function lockProduct(tx: Transaction<Database>, id: number): Promise<Product | undefined> {
  const r = await tx.selectFrom('products').selectAll().where('id', '=', id).forUpdate().executeTakeFirst()
  return r && toProduct(r)
}

export async function updateProductRow(db: Db, id: number, changes: Updateable<ProductsTable>): Promise<Product | undefined> {
  const r = await db
    .updateTable('products')
    .set({ ...changes, updated_at: new Date() })
    .where('id', '=', id)
    .returningAll()
    .executeTakeFirst()
  return r && toProduct(r)
}

export async function listProductsWithLatest(db: Db): Promise<ProductListItem[]> {
  const products = await db.selectFrom('products').selectAll().orderBy('name').execute()
  const latest = await db
    .selectFrom('spec_revisions')
    .select(['id', 'product_id', 'number', 'frozen_at', 'tds_sha256'])
    .distinctOn('product_id')
    .orderBy('product_id')
    .orderBy('number', 'desc')
    .execute()
  const counts = await db
    .selectFrom('spec_revisions')
    .select((eb) => ['product_id', eb.fn.countAll<number>().as('n')])
    .groupBy('product_id')
    .execute()
  const latestBy = new Map(latest.map((r) => [r.product_id, r]))
  const countBy = new Map(counts.map((c) => [c.product_id, Number(c.n)]))
  return products.map((p) => {
    const l = latestBy.get(p.id)
    return {
      ...toProduct(p),
      revisionCount: countBy.get(p.id) ?? 0,
      latestRevision: l ? { id: l.id, number: l.number, frozenAt: l.frozen_at, hasTds: l.tds_sha256 !== null } : null,
    }
  })
}

// ── revisions ───────────────────────────────────────────────────────────────────────────────────

type RevisionColumns = Omit<Insertable<SpecRevisionsTable>, 'id' | 'product_id' | 'number' | 'tds_sha256' | 'frozen_at' | 'created_by' | 'created_at' | 'updated_by' | 'updated_at'>

/** SI fields → columns. */
export function fieldsToColumns(f: SpecRevisionFields): RevisionColumns {
  return {
    ref_temp_c: f.refTempC,
    flash_min_minutes: f.flashMinMinutes,
    flash_max_minutes: f.flashMaxMinutes,
    flash_before_next_minutes: f.flashBeforeNextMinutes,
    recoat_window_minutes: f.recoatWindowMinutes,
    coats: f.coats,
    pot_life_minutes: f.potLifeMinutes,
    mix_ratio: f.mixRatio,
    reducer_bands: JSON.stringify(f.reducerBands),
    min_air_temp_c: f.minAirTempC,
    max_air_temp_c: f.maxAirTempC,
    min_rh_pct: f.minRhPct,
    max_rh_pct: f.maxRhPct,
    dust_free_minutes: f.dustFreeMinutes,
    handle_minutes: f.handleMinutes,
    sand_polish_minutes: f.sandPolishMinutes,
    bake_schedules: JSON.stringify(f.bakeSchedules),
    min_cure_temp_c: f.minCureTempC,
    q10: f.q10,
    flash_table: f.flashTable && f.flashTable.length ? JSON.stringify(f.flashTable) : null,
    wb_ref_rh_pct: f.wbRefRhPct,
    wb_ref_airflow_mps: f.wbRefAirflowMps,
    wb_airflow_exponent: f.wbAirflowExponent,
  }
}

/** Columns → SI fields. */
export function columnsToFields(r: Selectable<SpecRevisionsTable>): SpecRevisionFields {
  return {
    refTempC: r.ref_temp_c,
    flashMinMinutes: r.flash_min_minutes,
    flashMaxMinutes: r.flash_max_minutes,
    flashBeforeNextMinutes: r.flash_before_next_minutes,
    recoatWindowMinutes: r.recoat_window_minutes,
    coats: r.coats,
    potLifeMinutes: r.pot_life_minutes,
    mixRatio: r.mix_ratio,
    reducerBands: (r.reducer_bands ?? []).map((b) => ({ fromC: b.fromC ?? null, toC: b.toC ?? null, grade: b.grade })),
    minAirTempC: r.min_air_temp_c,
    maxAirTempC: r.max_air_temp_c,
    minRhPct: r.min_rh_pct,
    maxRhPct: r.max_rh_pct,
    dustFreeMinutes: r.dust_free_minutes,
    handleMinutes: r.handle_minutes,
    sandPolishMinutes: r.sand_polish_minutes,
    bakeSchedules: (r.bake_schedules ?? []).map((b) => ({ objectTempC: b.objectTempC, minutes: b.minutes })),
    minCureTempC: r.min_cure_temp_c,
    q10: r.q10,
    flashTable: r.flash_table && r.flash_table.length ? r.flash_table.map((x) => ({ tempC: x.tempC, minutes: x.minutes })) : null,
    wbRefRhPct: r.wb_ref_rh_pct,
    wbRefAirflowMps: r.wb_ref_airflow_mps,
    wbAirflowExponent: r.wb_airflow_exponent,
  }
}

function revisionQuery(db: Db) {
  return db
    .selectFrom('spec_revisions as r')
    .leftJoin('files as f', 'f.sha256', 'r.tds_sha256')
    .leftJoin('users as cu', 'cu.id', 'r.created_by')
    .leftJoin('users as uu', 'uu.id', 'r.updated_by')
    .selectAll('r')
    .select(['f.size_bytes as tds_size', 'f.original_name as tds_name', 'f.uploaded_at as tds_uploaded_at', 'cu.name as created_by_name', 'uu.name as updated_by_name'])
}

type RevisionJoinRow = Awaited<ReturnType<ReturnType<typeof revisionQuery>['executeTakeFirstOrThrow']>>

function toRevision(r: RevisionJoinRow): SpecRevision {
  return {
    id: r.id,
    productId: r.product_id,
    number: r.number,
    ...columnsToFields(r),
    frozenAt: r.frozen_at,
    tds:
      r.tds_sha256 && r.tds_size !== null && r.tds_name !== null && r.tds_uploaded_at !== null
        ? { sha256: r.tds_sha256, sizeBytes: r.tds_size, name: r.tds_name, uploadedAt: r.tds_uploaded_at, url: fileUrl(r.tds_sha256) }
        : null,
    createdAt: r.created_at,
    createdBy: r.created_by_name,
    updatedAt: r.updated_at,
    updatedBy: r.updated_by_name,
  }
}

export async function findRevision(db: Db, id: number): Promise<SpecRevision | undefined> {
  const r = await revisionQuery(db).where('r.id', '=', id).executeTakeFirst()
  return r && toRevision(r)
}

/** Every revision of a product, newest first (the history stays readable). */
export async function listRevisions(db: Db, productId: number): Promise<SpecRevision[]> {
  const rows = await revisionQuery(db).where('r.product_id', '=', productId).orderBy('r.number', 'desc').execute()
  return rows.map(toRevision)
}

/** A revision with its product, or undefined. */
export async function findRevisionWithProduct(db: Db, id: number): Promise<{ revision: SpecRevision; product: Product } | undefined> {
  const revision = await findRevision(db, id)
  if (!revision) return undefined
  const product = await findProduct(db, revision.productId)
  return product && { revision, product }
}

/** A revision as the jobs code reads it: its SI fields plus what the engine needs of its product. */
export interface RevisionWithProduct {
  id: number
  number: number
  productId: number
  productName: string
  category: ProductRow['category']
  product: ProductEngineFields
  fields: SpecRevisionFields
  frozen: boolean
  /** Present when a data sheet is attached. */
  tdsSha256: string | null
}

/** Several revisions with their products in one query (unknown ids are left out). */
export async function findRevisionsWithProduct(db: Db, ids: readonly number[]): Promise<RevisionWithProduct[]> {
  if (!ids.length) return []
  const rows = await db
    .selectFrom('spec_revisions as r')
    .innerJoin('products as p', 'p.id', 'r.product_id')
    .selectAll('r')
    .select(['p.name as product_name', 'p.category as product_category', 'p.chemistry as product_chemistry', 'p.components as product_components'])
    .where('r.id', 'in', [...ids])
    .execute()
  return rows.map((r) => ({
    id: r.id,
    number: r.number,
    productId: r.product_id,
    productName: r.product_name,
    category: r.product_category,
    product: { chemistry: r.product_chemistry, components: Number(r.product_components) === 2 ? 2 : 1 },
    fields: columnsToFields(r),
    frozen: r.frozen_at !== null,
    tdsSha256: r.tds_sha256,
  }))
}

/** Locks a revision row for the rest of the transaction; returns its product id and frozen state. */
export async function lockRevision(tx: Transaction<Database>, id: number) {
  return tx.selectFrom('spec_revisions').select(['id', 'product_id', 'number', 'frozen_at', 'tds_sha256']).where('id', '=', id).forUpdate().executeTakeFirst()
}

/**
 * Inserts the next revision of a product (number = highest + 1). Locks the product row so two
 * concurrent inserts cannot pick the same number (the unique key would refuse the second anyway).
 */
export async function insertRevision(
  tx: Transaction<Database>,
  productId: number,
  fields: SpecRevisionFields,
  meta: { userId: number | null; tdsSha256?: string | null },
): Promise<SpecRevision> {
  await tx.selectFrom('products').select('id').where('id', '=', productId).forUpdate().executeTakeFirstOrThrow()
  const max = await tx
    .selectFrom('spec_revisions')
    .select((eb) => eb.fn.max('number').as('n'))
    .where('product_id', '=', productId)
    .executeTakeFirst()
  const number = Number(max?.n ?? 0) + 1
  const row = await tx
    .insertInto('spec_revisions')
    .values({
      ...fieldsToColumns(fields),
      product_id: productId,
      number,
      tds_sha256: meta.tdsSha256 ?? null,
      created_by: meta.userId,
      updated_by: meta.userId,
    })
    .returning('id')
    .executeTakeFirstOrThrow()
  return (await findRevision(tx, row.id))!
}

/** Replaces the fields of a draft revision (the database refuses this for a frozen one). */
export async function updateRevisionFields(tx: Transaction<Database>, id: number, fields: SpecRevisionFields, userId: number | null): Promise<SpecRevision> {
  await tx
    .updateTable('spec_revisions')
    .set({ ...fieldsToColumns(fields), updated_by: userId, updated_at: new Date() })
    .where('id', '=', id)
    .where('frozen_at', 'is', null)
    .executeTakeFirstOrThrow()
  return (await findRevision(tx, id))!
}

export async function setRevisionTds(tx: Transaction<Database>, id: number, sha256: string, userId: number | null): Promise<SpecRevision> {
  await tx.updateTable('spec_revisions').set({ tds_sha256: sha256, updated_by: userId, updated_at: new Date() }).where('id', '=', id).execute()
  return (await findRevision(tx, id))!
}

export async function countRevisions(db: Db, productId: number): Promise<number> {
  const r = await db.selectFrom('spec_revisions').select((eb) => eb.fn.countAll<number>().as('n')).where('product_id', '=', productId).executeTakeFirstOrThrow()
  return Number(r.n)
}

export async function countFrozenRevisions(db: Db, productId: number): Promise<number> {
  const r = await db
    .selectFrom('spec_revisions')
    .select((eb) => eb.fn.countAll<number>().as('n'))
    .where('product_id', '=', productId)
    .where('frozen_at', 'is not', null)
    .executeTakeFirstOrThrow()
  return Number(r.n)
}

// ── freezing ────────────────────────────────────────────────────────────────────────────────────

export interface FreezeOptions {
  /** Who caused it (actorOf(user)); default: the system. */
  actor?: { id: number | null; label: string }
  /** What used the revision, for the event, e.g. { type: 'coat', id: 12 }. */
  usedBy?: { type: string; id: string | number }
  at?: Date
}

export const SYSTEM_ACTOR = { id: null, label: 'Boothbeat' } as const

/**
 * Freezes a spec revision: call it in the same transaction that records the first coat or mix using the
 * revision. Idempotent: an already frozen revision stays as it is and no event is written; the first
 * freeze writes `spec.revision.frozen`. Returns the revision and whether this call froze it, or
 * undefined when there is no such revision.
 */
export async function freezeRevision(
  tx: Transaction<Database>,
  revisionId: number,
  opts: FreezeOptions = {},
): Promise<{ revision: SpecRevision; newlyFrozen: boolean } | undefined> {
  const at = opts.at ?? new Date()
  const frozen = await tx
    .updateTable('spec_revisions')
    .set({ frozen_at: at })
    .where('id', '=', revisionId)
    .where('frozen_at', 'is', null)
    .returning(['id', 'product_id', 'number'])
    .executeTakeFirst()
  if (frozen) {
    await appendEvent(tx, {
      type: 'spec.revision.frozen',
      actor: opts.actor ?? SYSTEM_ACTOR,
      subject: { type: 'spec_revision', id: frozen.id },
      data: { revisionId: frozen.id, productId: frozen.product_id, number: frozen.number, usedBy: opts.usedBy ?? null },
      at,
    })
  }
  const revision = await findRevision(tx, revisionId)
  return revision && { revision, newlyFrozen: !!frozen }
}
