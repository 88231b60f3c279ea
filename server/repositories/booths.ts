import type { Kysely } from 'kysely'
import type { Database } from '../db/database'

type Db = Kysely<Database>

export interface BoothRow {
  id: number
  slug: string
  name: string
  kind: Database['booths']['kind']
  has_heater: boolean
  site_id: number
  site_slug: string
  site_name: string
}

function boothQuery(db: Db) {
  return db
    .selectFrom('booths')
    .innerJoin('sites', 'sites.id', 'booths.site_id')
    .select([
      'booths.id',
      'booths.slug',
      'booths.name',
      'booths.kind',
      'booths.has_heater',
      'booths.site_id',
      'sites.slug as site_slug',
      'sites.name as site_name',
    ])
}

export function listBooths(db: Db): Promise<BoothRow[]> {
  return boothQuery(db).orderBy('booths.id').execute()
}

export function findBooth(db: Db, id: number): Promise<BoothRow | undefined> {
  return boothQuery(db).where('booths.id', '=', id).executeTakeFirst()
}

export function listActiveDevices(db: Db) {
  return db
    .selectFrom('devices')
    .select(['id', 'booth_id', 'secret_hash', 'created_at', 'rotated_at', 'last_status', 'last_status_at'])
    .where('revoked_at', 'is', null)
    .orderBy('created_at')
    .execute()
}

export function findActiveDevice(db: Db, deviceId: string) {
  return db
    .selectFrom('devices')
    .innerJoin('booths', 'booths.id', 'devices.booth_id')
    .innerJoin('sites', 'sites.id', 'booths.site_id')
    .select(['devices.id', 'devices.booth_id', 'devices.secret_hash', 'booths.slug as booth_slug', 'sites.slug as site_slug'])
    .where('devices.id', '=', deviceId)
    .where('devices.revoked_at', 'is', null)
    .executeTakeFirst()
}

export function listDevicesOfBooth(db: Db, boothId: number) {
  return db
    .selectFrom('devices')
    .select(['id', 'created_at', 'rotated_at', 'revoked_at', 'last_status', 'last_status_at'])
    .where('booth_id', '=', boothId)
    .orderBy('created_at')
    .execute()
}

export async function setDeviceStatus(db: Db, deviceId: string, status: string, at: Date): Promise<void> {
  await db.updateTable('devices').set({ last_status: status, last_status_at: at }).where('id', '=', deviceId).execute()
}
