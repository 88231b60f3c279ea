import type { ColumnType, Generated } from 'kysely'
import type { BakeSchedule, Chemistry, Components, FlashTableRow, ProductCategory, ReducerBandInput } from '#shared/schemas/spec'

// Products, spec revisions and uploaded files (migration 0004_spec_sheets). Values are SI.

type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type UpdatedAt = ColumnType<Date, Date | string | undefined, Date | string>
/** jsonb: pg parses it on the way out; we send JSON text on the way in. */
type Json<T> = ColumnType<T, string, string>
type Num = number
type NumOrNull = number | null

export interface FilesTable {
  /** Lower-case hex SHA-256 of the bytes; also the file's name on disk under UPLOAD_DIR. */
  sha256: string
  size_bytes: number
  content_type: string
  /** Sanitised name of the first upload of these bytes. */
  original_name: string
  uploaded_by: number | null
  uploaded_at: CreatedAt
}

export interface ProductsTable {
  id: Generated<number>
  name: string
  category: ProductCategory
  chemistry: Chemistry
  components: Components
  notes: Generated<string>
  created_by: number | null
  created_at: CreatedAt
  updated_at: UpdatedAt
}

export interface SpecRevisionsTable {
  id: Generated<number>
  product_id: number
  number: number
  ref_temp_c: Num
  flash_min_minutes: Num
  flash_max_minutes: Num
  flash_before_next_minutes: Num
  recoat_window_minutes: NumOrNull
  coats: number
  pot_life_minutes: NumOrNull
  mix_ratio: string | null
  reducer_bands: Json<ReducerBandInput[]>
  min_air_temp_c: NumOrNull
  max_air_temp_c: NumOrNull
  min_rh_pct: NumOrNull
  max_rh_pct: NumOrNull
  dust_free_minutes: NumOrNull
  handle_minutes: NumOrNull
  sand_polish_minutes: NumOrNull
  bake_schedules: Json<BakeSchedule[]>
  min_cure_temp_c: NumOrNull
  q10: Num
  flash_table: ColumnType<FlashTableRow[] | null, string | null, string | null>
  wb_ref_rh_pct: NumOrNull
  wb_ref_airflow_mps: NumOrNull
  wb_airflow_exponent: NumOrNull
  tds_sha256: string | null
  /** Set once a coat or mix uses the revision (or on request); the row's values never change after. */
  frozen_at: ColumnType<Date | null, Date | string | null | undefined, Date | string | null>
  created_by: number | null
  created_at: CreatedAt
  updated_by: number | null
  updated_at: UpdatedAt
}

export interface SpecTables {
  files: FilesTable
  products: ProductsTable
  spec_revisions: SpecRevisionsTable
}
