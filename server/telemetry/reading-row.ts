// One accepted reading on its way to PostgreSQL, in SI units, flat for the batch writer.
export interface ReadingRow {
  boothId: number
  tsMs: number
  receivedMs: number
  deviceId: string
  seq: number | null
  airTempC: number | null
  rhPct: number | null
  panelTempC: number | null
  airflowMps: number | null
  boothDpPa: number | null
  intakeFilterDpPa: number | null
  exhaustFilterDpPa: number | null
  heaterOn: boolean | null
  dewPointC: number | null
}
