import type { ColumnType } from 'kysely'

export interface EventLogTable {
  seq: number
  at: ColumnType<Date, Date, never>
  type: string
  actor_id: number | null
  actor_label: string
  subject_type: string
  subject_id: string
  /** Canonical JSON of the event's data, exactly as hashed. */
  payload: string
  prev_hash: string
  hash: string
}

export interface EventLogTables {
  event_log: EventLogTable
}
