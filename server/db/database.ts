import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'
import type { RollupChannel } from './channels'
import type { AlertTables } from './tables/alerts'
import type { BakeTables } from './tables/bakes'
import type { EventLogTables } from './tables/event-log'
import type { EvidenceTables } from './tables/evidence'
import type { JobTables } from './tables/jobs'
import type { SpecTables } from './tables/specs'

// The one typed view of the schema. Each table's row types come from here (Selectable / Insertable /
// Updateable); migrations in ./migrations are the source of truth for the DDL.

type Timestamp = ColumnType<Date, Date | string, Date | string>
type CreatedAt = ColumnType<Date, Date | string | undefined, never>
type Json<T> = ColumnType<T, string, string>

export type Role = 'admin' | 'manager' | 'tech' | 'painter' | 'auditor'
export const ROLES: readonly Role[] = ['admin', 'manager', 'tech', 'painter', 'auditor']

export interface UserPrefs {
  temperature?: 'C' | 'F'
  airflow?: 'm/s' | 'ft/min'
  pressure?: 'Pa' | 'inH2O'
}

export interface UsersTable {
  id: Generated<number>
  email: string
  name: string
  role: Role
  password_hash: string
  must_change_password: Generated<boolean>
  pin_hash: string | null
  prefs: ColumnType<UserPrefs, string | undefined, string>
  disabled_at: Timestamp | null
  created_at: CreatedAt
  updated_at: ColumnType<Date, Date | string | undefined, Date | string>
}

export interface SiteUnits {
  temperature: 'C' | 'F'
  airflow: 'm/s' | 'ft/min'
  pressure: 'Pa' | 'inH2O'
}

export interface SitesTable {
  id: Generated<number>
  slug: string
  name: string
  time_zone: Generated<string>
  units: ColumnType<SiteUnits, string | undefined, string>
  created_at: CreatedAt
}

export type BoothKind = 'downdraft' | 'semi_downdraft' | 'crossdraft' | 'prep_deck'

export interface BoothsTable {
  id: Generated<number>
  site_id: number
  slug: string
  name: string
  kind: BoothKind
  has_heater: Generated<boolean>
  created_at: CreatedAt
}

export interface DevicesTable {
  id: string
  booth_id: number
  secret_hash: string
  revoked_at: Timestamp | null
  rotated_at: Timestamp | null
  last_status: string | null
  last_status_at: Timestamp | null
  created_at: CreatedAt
}

export interface ReadingsTable {
  booth_id: number
  ts: Timestamp
  received_at: ColumnType<Date, Date | string | undefined, never>
  device_id: string
  seq: ColumnType<number | null, number | null | undefined, never>
  air_temp_c: number | null
  rh_pct: number | null
  panel_temp_c: number | null
  airflow_mps: number | null
  booth_dp_pa: number | null
  intake_filter_dp_pa: number | null
  exhaust_filter_dp_pa: number | null
  heater_on: boolean | null
  dew_point_c: number | null
}

type RollupStats = { [K in RollupChannel as `${K}_min` | `${K}_max`]: number | null } & {
  [K in RollupChannel as `${K}_sum`]: number | null
} & { [K in RollupChannel as `${K}_n`]: number }

export type ReadingsMinuteTable = {
  booth_id: number
  minute: Timestamp
  n: number
} & RollupStats

export type BoothMode = 'idle' | 'spray' | 'flash' | 'bake' | 'cool'

export interface BoothModesTable {
  booth_id: number
  ts: Timestamp
  mode: BoothMode
}

export interface RejectedReadingsTable {
  id: Generated<number>
  booth_id: number | null
  topic: string
  reason: string
  detail: string
  payload: string
  received_at: CreatedAt
}

export interface RejectedCountsTable {
  booth_key: string
  reason: string
  count: number
  last_at: Timestamp
}

// Each area keeps its tables in ./tables/<area>.ts; they all meet here.
export interface Database extends SpecTables, JobTables, AlertTables, BakeTables, EvidenceTables, EventLogTables {
  users: UsersTable
  sites: SitesTable
  booths: BoothsTable
  devices: DevicesTable
  readings: ReadingsTable
  readings_minute: ReadingsMinuteTable
  booth_modes: BoothModesTable
  rejected_readings: RejectedReadingsTable
  rejected_counts: RejectedCountsTable
}

export type User = Selectable<UsersTable>
export type NewUser = Insertable<UsersTable>
export type UserUpdate = Updateable<UsersTable>
export type Site = Selectable<SitesTable>
export type Booth = Selectable<BoothsTable>
export type NewBooth = Insertable<BoothsTable>
export type Device = Selectable<DevicesTable>
export type NewDevice = Insertable<DevicesTable>
export type Reading = Selectable<ReadingsTable>
export type NewReading = Insertable<ReadingsTable>
export type ReadingMinute = Selectable<ReadingsMinuteTable>
export type RejectedReading = Selectable<RejectedReadingsTable>
