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

/**
 * A stored reading as the export reads it: every value as PostgreSQL's text output (a float4 comes back
 * as its shortest exact decimal, e.g. "21.4"), so raw values are written exactly as stored and nothing is
 * parsed that is not computed with. (Reading typed rows promoted every row to V8's old generation and made
 * the server's memory swing by hundreds of MB on a long export; text rows die young.)
 */
export interface ExportReadingRow {
  /** ISO 8601 UTC with milliseconds. */
  ts_iso: string
  device_id: string
  seq: string | null
  air_temp_c: string | null
  rh_pct: string | null
  panel_temp_c: string | null
  airflow_mps: string | null
  booth_dp_pa: string | null
  intake_filter_dp_pa: string | null
  exhaust_filter_dp_pa: string | null
  /** PostgreSQL's boolean text: 't' / 'f'. */
  heater_on: string | null
  dew_point_c: string | null
}

/** Calibration of a value of `channel` at tsMs (null stays null); null when the booth has no calibrations. */
export type Calibrate = ((channel: CalibratedChannel, tsMs: number, value: number | null) => number | null) | null

export const CSV_FORMAT = {
  mediaType: 'text/csv; charset=utf-8; header=present',
  standard: 'RFC 4180',
  encoding: 'UTF-8 with byte-order mark',
  recordSeparator: 'CRLF',
  times: 'ISO 8601, UTC',
  units: 'SI; header names carry the unit in brackets',
  values: 'calibrated at read time; *_raw columns hold the stored values when a booth in the export has calibrations',
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
const round3 = (v: number) => Math.round(v * 1000) / 1000
const round2 = (v: number) => Math.round(v * 100) / 100

const COLUMN_OF = Object.fromEntries(CHANNELS.map((c) => [c.wire, c.column])) as Record<CalibratedChannel, Channel['column']>
const CALIBRATED = CALIBRATED_CHANNELS.map((wire) => ({ wire, column: COLUMN_OF[wire] }))
if (CALIBRATED.some((c, i) => c.column !== CHANNELS[i]?.column)) throw new Error('CALIBRATED_CHANNELS must list the channels in CHANNELS order')

export type CsvCell = string | number | null

/** One CSV record (cells in csvColumns order) from a stored reading. */
const num = (v: string | null): number | null => {
  if (v === null) return null
  const n = Number(v)
  return Number.isFinite(n) ? n : null
}

/** One CSV record (cells in csvColumns order) from a stored reading. Numeric cells are numbers or their stored text. */
export function csvRecord(row: ExportReadingRow, boothSlug: string, calibrate: Calibrate, includeRaw: boolean): CsvCell[] {
  const cells: CsvCell[] = [row.ts_iso, neutraliseText(boothSlug), neutraliseText(row.device_id), row.seq]
  let air = num(row.air_temp_c)
  let rh = num(row.rh_pct)
  let panel = num(row.panel_temp_c)
  let moved = false
  if (calibrate) {
    const t = Date.parse(row.ts_iso)
    for (const c of CALIBRATED) {
      const text = row[c.column]
      const raw = num(text)
      const v = calibrate(c.wire, t, raw)
      if (v !== raw && v !== null) {
        const r = round3(v)
        cells.push(r)
        if (c.wire === 'airTempC') air = r
        else if (c.wire === 'rhPct') rh = r
        else if (c.wire === 'panelTempC') panel = r
        if (c.wire === 'airTempC' || c.wire === 'rhPct') moved = true
      } else cells.push(text)
    }
  } else {
    for (const c of CHANNELS) cells.push(row[c.column])
  }
  let dew: CsvCell = row.dew_point_c
  let dewNum = num(row.dew_point_c)
  if (moved) {
    const dp = air !== null && rh !== null && rh > 0 ? dewPointC(air, Math.min(100, rh)) : Number.NaN
    dewNum = Number.isFinite(dp) ? round2(dp) : null
    dew = dewNum
  }
  const surface = panel ?? air
  cells.push(dew, surface !== null && dewNum !== null ? round2(surface - dewNum) : null, row.heater_on === null ? null : row.heater_on === 't' ? 'true' : 'false')
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
