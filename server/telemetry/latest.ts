import { sql, type Kysely } from 'kysely'
import type { Database, Reading } from '../db/database'
import type { LiveBoothState } from './live-hub'
import { toLiveReading } from './live-hub'
import type { ReadingRow } from './reading-row'

export function rowFromStored(r: Reading): ReadingRow {
  return {
    boothId: r.booth_id,
    tsMs: r.ts.getTime(),
    receivedMs: r.received_at.getTime(),
    deviceId: r.device_id,
    seq: r.seq,
    airTempC: r.air_temp_c,
    rhPct: r.rh_pct,
    panelTempC: r.panel_temp_c,
    airflowMps: r.airflow_mps,
    boothDpPa: r.booth_dp_pa,
    intakeFilterDpPa: r.intake_filter_dp_pa,
    exhaustFilterDpPa: r.exhaust_filter_dp_pa,
    heaterOn: r.heater_on,
    dewPointC: r.dew_point_c,
  }
}

/** The last reading (within a day) and mode of every booth, to prime the live state at start-up. */
export async function loadLatestStates(db: Kysely<Database>): Promise<LiveBoothState[]> {
  const [booths, readings, modes, devices] = await Promise.all([
    db.selectFrom('booths').select('id').execute(),
    db
      .selectFrom('readings')
      .distinctOn('booth_id')
      .selectAll()
      .where('ts', '>', sql<Date>`now() - interval '1 day'`)
      .orderBy('booth_id')
      .orderBy('ts', 'desc')
      .execute(),
    db.selectFrom('booth_modes').distinctOn('booth_id').selectAll().orderBy('booth_id').orderBy('ts', 'desc').execute(),
    db.selectFrom('devices').select(['booth_id', 'last_status']).where('revoked_at', 'is', null).execute(),
  ])
  return booths.map(({ id }) => {
    const r = readings.find((x) => x.booth_id === id)
    const m = modes.find((x) => x.booth_id === id)
    return {
      boothId: id,
      reading: r ? toLiveReading(rowFromStored(r)) : null,
      mode: m?.mode ?? null,
      modeSince: m ? m.ts.toISOString() : null,
      deviceStatus: devices.find((d) => d.booth_id === id)?.last_status ?? null,
    }
  })
}
