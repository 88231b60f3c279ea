import { stringify, type Options } from 'csv-stringify/sync'
import { dewPointC } from '#shared/cure/psychrometrics'
import { CALIBRATED_CHANNELS, type CalibratedChannel } from '#shared/bake/channels'
import { CHANNELS } from '../db/channels'

// The raw environment log as CSV. Pure: the columns, one record per stored reading, and the stringifier.
//
// Format (stated again in the manifest):
// - RFC 4180: comma separated, CRLF after every record (the last one too), a field is quoted when it holds
//   a comma, a double quote, CR or LF, and a double quote inside is doubled. One header row.
// - UTF-8 with a byte-order mark. RFC 4180 does not forbid one and spreadsheet programs need it to read the
//   units (°C) in the header as UTF-8 instead of a legacy code page; csv-parse reads it with `bom: true`.
// - Times are ISO 8601 in UTC with milliseconds ("2026-11-30T08:15:00.000Z").
// - Values are SI, calibrated at read time (the offset in force at each reading's time, as every screen
//   shows them); when the booth has calibrations the stored raw values follow in `…_raw` columns.
// - Spreadsheet formula injection (OWASP "CSV Injection"): a text cell starting with = + - @ TAB or CR is
//   prefixed with a single quote so a spreadsheet shows it as text. Number cells are never touched (−3.5
//   stays a number); only text cells (booth, device id) can carry such a value.

type Channel = (typeof CHANNELS)[number]

export interface ExportReadingRow {
  ts: Date
  device_id: string
  seq: number | null
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

/** Calibration of a value of `channel` at tsMs (null stays null). */
export type Calibrate = (channel: CalibratedChannel, tsMs: number, value: number | null) => number | null

export const CSV_FORMAT = {
  mediaType: 'text/csv; charset=utf-8; header=present',
  standard: 'RFC 4180',
  encoding: 'UTF-8 with byte-order mark',
  recordSeparator: 'CRLF',
  times: 'ISO 8601, UTC',
  units: 'SI; header names carry the unit in brackets',
  values: 'calibrated at read time; *_raw columns hold the stored values when the booth has calibrations',
  formulaGuard: "text cells starting with = + - @ TAB or CR are prefixed with ' (OWASP CSV injection)",
} as const

const withUnit = (name: string, unit: string) => `${name} [${unit}]`

/** Header names, in order. */
export function csvColumns(includeRaw: boolean): string[] {
  const cols = ['time_utc [ISO 8601]', 'booth', 'device_id', 'seq']
  for (const c of CHANNELS) cols.push(withUnit(c.column, c.unit))
  cols.push(withUnit('dew_point_c', '°C'), withUnit('dew_point_margin_c', '°C'), 'heater_on [true/false]')
  if (includeRaw) {
    for (const c of CHANNELS) cols.push(withUnit(`${c.column}_raw`, c.unit))
    cols.push(withUnit('dew_point_c_raw', '°C'))
  }
  return cols
}

const FORMULA_START = /^[=+\-@\t\r]/

/** A text cell made safe for spreadsheets: a leading = + - @ TAB or CR gets a single quote in front. */
export function neutraliseText(s: string): string {
  return FORMULA_START.test(s) ? `'${s}` : s
}

// Calibrated values carry the float noise of an addition (21.4 + 0.3); three decimals is finer than any
// booth sensor resolves. Raw values are written exactly as stored.
const round3 = (v: number | null) => (v === null ? null : Math.round(v * 1000) / 1000)
const round2 = (v: number) => Math.round(v * 100) / 100

const COLUMN_OF = Object.fromEntries(CHANNELS.map((c) => [c.wire, c.column])) as Record<CalibratedChannel, Channel['column']>
const CALIBRATED = CALIBRATED_CHANNELS.map((wire) => ({ wire, column: COLUMN_OF[wire] }))

export type CsvCell = string | number | null

/** One CSV record (cells in csvColumns order) from a stored reading. */
export function csvRecord(row: ExportReadingRow, boothSlug: string, calibrate: Calibrate, includeRaw: boolean): CsvCell[] {
  const t = row.ts.getTime()
  const cal: Record<string, number | null> = {}
  let moved = false
  for (const c of CALIBRATED) {
    const raw = row[c.column]
    const v = calibrate(c.wire, t, raw)
    if (v !== raw) {
      cal[c.column] = round3(v)
      if (c.wire === 'airTempC' || c.wire === 'rhPct') moved = true
    } else cal[c.column] = raw
  }
  let dew = row.dew_point_c
  if (moved) {
    const air = cal.air_temp_c ?? null
    const rh = cal.rh_pct ?? null
    const dp = air !== null && rh !== null && rh > 0 ? dewPointC(air, Math.min(100, rh)) : Number.NaN
    dew = Number.isFinite(dp) ? round2(dp) : null
  }
  const surface = cal.panel_temp_c ?? cal.air_temp_c ?? null
  const margin = surface !== null && dew !== null ? round2(surface - dew) : null
  const cells: CsvCell[] = [row.ts.toISOString(), neutraliseText(boothSlug), neutraliseText(row.device_id), row.seq]
  for (const c of CHANNELS) cells.push(cal[c.column] ?? null)
  cells.push(dew, margin, row.heater_on === null ? null : row.heater_on ? 'true' : 'false')
  if (includeRaw) {
    for (const c of CHANNELS) cells.push(row[c.column])
    cells.push(row.dew_point_c)
  }
  return cells
}

// csv-stringify quotes a field holding the delimiter or a quote by itself; `quoted_match` adds lone CR and
// LF, which RFC 4180 also requires quoted.
const OPTIONS: Options = {
  delimiter: ',',
  quote: '"',
  escape: '"',
  record_delimiter: '\r\n',
  quoted_match: /[\r\n]/,
  cast: { number: (v) => String(v) },
}

/**
 * Records as CSV text, through csv-stringify, each record ending in CRLF; `bom` puts the byte-order mark
 * first (the file's first chunk only). The export calls this once per page of readings, so the stream
 * machinery (and its per-chunk cost in the zip and hash stages) sees one chunk per page, not per row.
 */
export function csvText(records: readonly CsvCell[][], opts: { bom?: boolean } = {}): string {
  return stringify(records as CsvCell[][], { ...OPTIONS, bom: opts.bom === true })
}
