import type { ColumnType, Insertable, Selectable } from 'kysely'

// Evidence exports (migration 0008_evidence): who exported what, when, and the hashes of what they got.

type Timestamp = ColumnType<Date, Date | string, Date | string>

export type ExportKind = 'pack' | 'csv'
export type ExportScope = 'job' | 'booth'

/** One file of an export, as the manifest lists it. */
export interface ExportFile {
  name: string
  sha256: string
  bytes: number
}

export interface ExportsTable {
  /** Also in the manifest and the event, so a zip can be matched to its record. */
  id: string
  kind: ExportKind
  scope: ExportScope
  job_id: number | null
  booth_id: number | null
  period_from: Timestamp
  period_to: Timestamp
  exported_by: number | null
  exported_by_label: string
  exported_at: ColumnType<Date, Date | string | undefined, never>
  file_name: string
  files: ColumnType<ExportFile[], string, never>
  /** SHA-256 of manifest.json as it is in the zip; null for a CSV-only export. */
  manifest_sha256: string | null
  /** manifest.json exactly as in the zip (null for a CSV-only export). */
  manifest: string | null
  reading_count: number
  /** seq of the evidence.exported event. */
  event_seq: number
}

// Tables of this area, merged into the Database interface (server/db/database.ts).
export interface EvidenceTables {
  exports: ExportsTable
}

export type ExportRow = Selectable<ExportsTable>
export type NewExportRow = Insertable<ExportsTable>
