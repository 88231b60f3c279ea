import { describe, expect, it } from 'vitest'
import type { Kysely } from 'kysely'
import { applyCalibration, calibrateReadingRow, calibrateSeriesPoints, offsetAt, setCalibrationCache } from '../../../server/domain/calibration'
import type { Database } from '../../../server/db/database'
import type { ReadingRow } from '../../../server/telemetry/reading-row'
import { dewPointC } from '#shared/cure/psychrometrics'

const T = Date.UTC(2026, 10, 2, 12, 0, 0)
const H = 3_600_000

describe('calibration offsets from their effective time on', () => {
  setCalibrationCache([
    { boothId: 1, channel: 'panelTempC', effectiveMs: T, offset: 1.5 },
    { boothId: 1, channel: 'panelTempC', effectiveMs: T + 2 * H, offset: -0.4 },
    { boothId: 1, channel: 'rhPct', effectiveMs: T + H, offset: 3 },
  ])

  it('applies nothing before the first calibration, then the one in force (a later one replaces, never adds)', () => {
    expect(applyCalibration(1, 'panelTempC', T - 1, 60)).toBe(60)
    expect(applyCalibration(1, 'panelTempC', T, 60)).toBe(61.5)
    expect(applyCalibration(1, 'panelTempC', T + H, 60)).toBe(61.5)
    expect(applyCalibration(1, 'panelTempC', T + 2 * H, 60)).toBeCloseTo(59.6, 12)
    expect(applyCalibration(1, 'panelTempC', T + 9 * H, 60)).toBeCloseTo(59.6, 12)
    expect(offsetAt(1, 'panelTempC', T + 2 * H - 1)).toBe(1.5)
  })

  it('leaves other channels, other booths and missing values alone', () => {
    expect(applyCalibration(1, 'airTempC', T + H, 20)).toBe(20)
    expect(applyCalibration(2, 'panelTempC', T + H, 20)).toBe(20)
    expect(applyCalibration(1, 'panelTempC', T + H, null)).toBeNull()
  })

  it('a live row: calibrated channels, dew point recomputed from the calibrated humidity; the input row untouched', () => {
    const row: ReadingRow = {
      boothId: 1, tsMs: T + 90 * 60_000, receivedMs: T + 90 * 60_000, deviceId: 'd', seq: 1,
      airTempC: 20, rhPct: 50, panelTempC: 19, airflowMps: 0.4, boothDpPa: 5, intakeFilterDpPa: null, exhaustFilterDpPa: null,
      heaterOn: false, dewPointC: 9.26,
    }
    const out = calibrateReadingRow(row)
    expect(out.panelTempC).toBe(20.5)
    expect(out.rhPct).toBe(53)
    expect(out.dewPointC).toBeCloseTo(dewPointC(20, 53), 2)
    expect(row.rhPct).toBe(50)
    expect(row.panelTempC).toBe(19)
  })

  it('history points are calibrated at each point’s time', async () => {
    const db = {} as Kysely<Database> // the cache is set: no query is made
    const pts = [T - 60_000, T + 60_000].map((t) => ({
      t: new Date(t),
      values: { air_temp_c: 20, rh_pct: 50, panel_temp_c: 40, airflow_mps: 0.3, booth_dp_pa: 5, intake_filter_dp_pa: 90, exhaust_filter_dp_pa: 120, dew_point_c: 9.26 },
    }))
    const out = await calibrateSeriesPoints(db, 1, pts)
    expect(out.map((p) => p.values.panel_temp_c)).toEqual([40, 41.5])
    expect(out.map((p) => p.values.dew_point_c)).toEqual([9.26, 9.26])
    expect(pts[1]!.values.panel_temp_c).toBe(40)
  })
})
