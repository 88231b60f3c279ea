import type { ColumnType, Generated, Insertable, Selectable } from 'kysely'

// Watches, their evaluators' saved state, alerts and the mail outbox (migration 0006).

type Timestamp = ColumnType<Date, Date | string, Date | string>
type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type Json<T> = ColumnType<T, string, string>
type JsonDefault<T> = ColumnType<T, string | undefined, string>

export type AlertState = 'open' | 'acknowledged' | 'resolved'
export type AlertSeverity = 'critical' | 'warning'
export type AlertResolution = 'cleared' | 'manual' | 'watch_removed'
export type NotifyState = 'pending' | 'deferred' | 'digest' | 'sent' | 'skipped'
export type OutboxKind = 'alert' | 'escalation' | 'digest'
export type OutboxState = 'queued' | 'sent' | 'failed'

/** One stored watch: the rule as WatchRuleSchema outputs it, and who else gets its e-mails. */
export interface StoredWatch {
  rule: unknown
  recipients: string[]
}

export interface WatchSetsTable {
  booth_id: number
  rules: Json<StoredWatch[]>
  version: Generated<number>
  updated_by: number | null
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface StoredApplicationWindow {
  minTempC?: number
  maxTempC?: number
  minRhPct?: number
  maxRhPct?: number
}

export interface WatchStatesTable {
  booth_id: number
  snapshot: Json<unknown>
  application_window: ColumnType<unknown, string | null | undefined, string | null>
  saved_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface AlertsTable {
  id: Generated<number>
  booth_id: number
  rule_id: string
  kind: string
  /** The watch's own label when it opened, if it had one. */
  label: string | null
  severity: AlertSeverity
  channel: string | null
  unit: string | null
  state: Generated<AlertState>
  message: string
  clear_message: string | null
  value: number | null
  limit_value: number | null
  peak: number | null
  last_value: number | null
  opened_at: Timestamp
  cleared_at: Timestamp | null
  acknowledged_at: Timestamp | null
  acknowledged_by: number | null
  ack_note: string | null
  resolved_at: Timestamp | null
  resolved_by: number | null
  resolution: AlertResolution | null
  resolve_note: string | null
  recipients: JsonDefault<string[]>
  notify_state: Generated<NotifyState>
  notify_due_at: ColumnType<Date, Date | string | undefined, Date | string>
  notified_at: Timestamp | null
  escalations: Generated<number>
  next_escalation_at: Timestamp | null
  created_at: CreatedAt
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface OutboxTable {
  id: Generated<number>
  kind: OutboxKind
  alert_id: number | null
  alert_ids: JsonDefault<number[]>
  recipients: Json<string[]>
  subject: string
  text_body: string
  html_body: string
  state: Generated<OutboxState>
  attempts: Generated<number>
  next_attempt_at: ColumnType<Date, Date | string | undefined, Date | string>
  last_error: string | null
  message_id: string | null
  created_at: CreatedAt
  sent_at: Timestamp | null
}

// Tables of this area, merged into the Database interface (server/db/database.ts).
export interface AlertTables {
  watch_sets: WatchSetsTable
  watch_states: WatchStatesTable
  alerts: AlertsTable
  outbox: OutboxTable
}

export type AlertRow = Selectable<AlertsTable>
export type NewAlertRow = Insertable<AlertsTable>
export type OutboxRow = Selectable<OutboxTable>
export type NewOutboxRow = Insertable<OutboxTable>
