import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

type Timestamp = ColumnType<Date, Date | string, Date | string>

export type JobStatus = 'planned' | 'in_booth' | 'curing' | 'done'

/** A guard rail the painter went past, with the reason they gave. */
export interface CoatOverride {
  kind: 'flash_not_complete' | 'outside_application_window' | 'condensation_guard'
  detail: string
  reason: string
}

/** What the guard rails saw when a coat started; empty ({}) for the first coat of a job. */
export interface CoatStartCheck {
  flash?: {
    /** The coat whose flash-off was awaited. */
    previousCoatId: number
    /** 'between_coats' (same product) or 'next_product' (the product's flash before the next one). */
    kind: 'between_coats' | 'next_product'
    /** Wall-clock minutes from the end of that coat to this start. */
    waitedMinutes: number
    /** Flash progress at the start (1 = the data sheet's minimum flash reached); null when unknown. */
    progress: number | null
    ready: boolean
    /** When the minimum flash was (or was estimated to be) reached, ISO; null when unknown. */
    readyAt: string | null
    /** readyAt − end of the previous coat, minutes: the flash the conditions required. */
    requiredMinutes: number | null
    uncertain: boolean
  }
  applicationWindow?: { ok: boolean; problems: string[] }
  condensation?: { ok: boolean; marginC: number | null }
}

export type MixOutcome = 'used' | 'discarded'

export interface JobsTable {
  id: Generated<number>
  number: string
  vehicle: string
  colour_code: Generated<string>
  panels: ColumnType<string[], string[] | undefined, string[]>
  notes: Generated<string>
  painter_id: number | null
  booth_id: number | null
  status: Generated<JobStatus>
  created_by: number | null
  created_at: ColumnType<Date, Date | string | undefined, never>
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface JobStepsTable {
  id: Generated<number>
  job_id: number
  position: number
  revision_id: number
  coats_planned: number
  note: Generated<string>
}

export interface CoatsTable {
  id: Generated<number>
  job_id: number
  step_id: number
  booth_id: number
  coat_number: number
  painter_id: number | null
  started_at: Timestamp
  finished_at: Timestamp | null
  overrides: ColumnType<CoatOverride[], string | undefined, string>
  start_check: ColumnType<CoatStartCheck, string | undefined, string>
  finished_by: number | null
}

export interface MixesTable {
  id: Generated<number>
  booth_id: number
  job_id: number | null
  step_id: number | null
  revision_id: number
  reducer_grade: string | null
  amount_ml: number | null
  painter_id: number | null
  mixed_at: Timestamp
  closed_at: Timestamp | null
  close_outcome: MixOutcome | null
  closed_by: number | null
  air_temp_c: number | null
  reducer_advised: string | null
  warnings: ColumnType<string[], string | undefined, string>
}

export interface PairingCodesTable {
  id: Generated<number>
  booth_id: number
  code_hash: string
  created_by: number | null
  created_at: ColumnType<Date, Date | string | undefined, never>
  expires_at: Timestamp
  used_at: Timestamp | null
}

export interface JobTables {
  jobs: JobsTable
  job_steps: JobStepsTable
  coats: CoatsTable
  mixes: MixesTable
  pairing_codes: PairingCodesTable
}

export type Job = Selectable<JobsTable>
export type NewJob = Insertable<JobsTable>
export type JobStep = Selectable<JobStepsTable>
export type Coat = Selectable<CoatsTable>
export type Mix = Selectable<MixesTable>
