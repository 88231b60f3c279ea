import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'
import type { BakeResultSnapshot, BakeSource, BakeStateName, InspectionItemResult, NoteKind, UpkeepTask } from '#shared/bake/types'
import type { CalibratedChannel } from '#shared/bake/channels'

// Bake cycles and booth upkeep (migration 0007_bakes_and_maintenance).

type Timestamp = ColumnType<Date, Date | string, Date | string>
type CreatedAt = ColumnType<Date, Date | string | undefined, never>

export interface BakesTable {
  id: Generated<number>
  booth_id: number
  /** detected (by the system, to confirm) → confirmed → signed_off; or dismissed (not a bake). */
  state: BakeStateName
  source: BakeSource
  started_at: Timestamp
  ended_at: Timestamp | null
  end_source: BakeSource | null
  /** Hold (object) temperature the tech gave; null = from the spec schedules, else inferred. */
  target_temp_c: number | null
  notes: Generated<string>
  started_by: number | null
  confirmed_at: Timestamp | null
  confirmed_by: number | null
  ended_by: number | null
  signed_off_at: Timestamp | null
  signed_off_by: number | null
  sign_off_notes: Generated<string>
  dismiss_reason: string | null
  /** Phases and verdicts frozen at sign-off; null before (computed on read). */
  result: ColumnType<BakeResultSnapshot | null, string | null | undefined, string | null>
  created_at: CreatedAt
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface BakeJobsTable {
  bake_id: number
  job_id: number
  /** The step of the job's latest coat (its "last product"). */
  step_id: number | null
  revision_id: number | null
}

export interface FilterChangesTable {
  id: Generated<number>
  booth_id: number
  filter: 'intake' | 'exhaust'
  changed_at: Timestamp
  dp_before_pa: number | null
  dp_after_pa: number | null
  notes: Generated<string>
  recorded_by: number | null
  created_at: CreatedAt
}

export interface CalibrationsTable {
  id: Generated<number>
  booth_id: number
  channel: CalibratedChannel
  effective_at: Timestamp
  reference_value: number
  sensor_value: number
  /** reference − sensor, added to the raw readings of the channel from effective_at on. */
  offset_value: number
  instrument: Generated<string>
  next_due_at: Timestamp | null
  notes: Generated<string>
  recorded_by: number | null
  created_at: CreatedAt
}

export interface InspectionsTable {
  id: Generated<number>
  booth_id: number
  inspected_at: Timestamp
  items: ColumnType<InspectionItemResult[], string, string>
  all_ok: boolean
  notes: Generated<string>
  recorded_by: number | null
  created_at: CreatedAt
}

export interface MaintenanceNotesTable {
  id: Generated<number>
  booth_id: number
  kind: NoteKind
  noted_at: Timestamp
  text: string
  recorded_by: number | null
  created_at: CreatedAt
}

export interface MaintenanceRulesTable {
  booth_id: number
  task: Exclude<UpkeepTask, 'calibration'>
  interval_days: number | null
  interval_booth_hours: number | null
  interval_bake_cycles: number | null
  dp_limit_pa: number | null
  trend_horizon_days: number | null
  updated_by: number | null
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

// Tables of this area, merged into the Database interface (server/db/database.ts).
export interface BakeTables {
  bakes: BakesTable
  bake_jobs: BakeJobsTable
  filter_changes: FilterChangesTable
  calibrations: CalibrationsTable
  inspections: InspectionsTable
  maintenance_notes: MaintenanceNotesTable
  maintenance_rules: MaintenanceRulesTable
}

export type Bake = Selectable<BakesTable>
export type NewBake = Insertable<BakesTable>
export type BakeUpdate = Updateable<BakesTable>
export type BakeJob = Selectable<BakeJobsTable>
export type FilterChange = Selectable<FilterChangesTable>
export type Calibration = Selectable<CalibrationsTable>
export type Inspection = Selectable<InspectionsTable>
export type MaintenanceNote = Selectable<MaintenanceNotesTable>
export type MaintenanceRuleRow = Selectable<MaintenanceRulesTable>
