import { dewPointC } from '#shared/cure/psychrometrics'
import { CALIBRATED_CHANNELS, type CalibratedChannel } from '#shared/bake/channels'
import { CHANNELS } from '../db/channels'

// The raw environment log as CSV. Pure: the columns, one record per stored reading, and the formatter.
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

/**
 * A stored reading as the export reads it: a tuple (the time as ISO 8601 UTC with milliseconds, then the stored
 * columns, the channels in CHANNELS order), every value PostgreSQL's text output (a float4 comes back as its
 * shortest exact decimal, e.g. "21.4"), so raw values are written exactly as stored and nothing is parsed that
 * is not computed with; null = not measured.
 */
export type ExportReading = [
  tsIso: string,
  deviceId: string,
  seq: string | null,
  airTempC: string | null,
  rhPct: string | null,
  panelTempC: string | null,
  airflowMps: string | null,
  boothDpPa: string | null,
  intakeFilterDpPa: string | null,
  exhaustFilterDpPa: string | null,
  /** 'true' / 'false'. */
  heaterOn: string | null,
  dewPointC: string | null,
]

/** Index of the first channel (CHANNELS order); the heater and the dew point follow the channels. */
const CH0 = 3
const HEATER = CH0 + CHANNELS.length
const DEW = HEATER + 1
/** Fields of an ExportReading. */
export const READING_LENGTH = DEW + 1

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

// The calibrated channels are the first ones of CHANNELS, so channel i sits at CH0 + i of a reading.
if (CALIBRATED_CHANNELS.some((wire, i) => CHANNELS[i]?.wire !== wire)) throw new Error('CALIBRATED_CHANNELS must list the channels in CHANNELS order')
const AIR = CH0 + CALIBRATED_CHANNELS.indexOf('airTempC')
const RH = CH0 + CALIBRATED_CHANNELS.indexOf('rhPct')
const PANEL = CH0 + CALIBRATED_CHANNELS.indexOf('panelTempC')

export type CsvCell = string | number | null

/** Field i of a reading (past the fixed first three, where the index is computed). */
const field = (r: ExportReading, i: number): string | null => r[i] ?? null

const num = (v: string | null): number | null => {
  if (v === null) return null
  const n = Number(v)
  return Number.isFinite(n) ? n : null
}

/** One CSV record (cells in csvColumns order) from a stored reading. Numeric cells are numbers or their stored text. */
export function csvRecord(row: ExportReading, boothSlug: string, calibrate: Calibrate, includeRaw: boolean, cells: CsvCell[] = []): CsvCell[] {
  cells.length = 0
  cells.push(row[0], neutraliseText(boothSlug), neutraliseText(row[1]), row[2])
  let air = num(field(row, AIR))
  let rh = num(field(row, RH))
  let panel = num(field(row, PANEL))
  let moved = false
  if (calibrate) {
    const t = Date.parse(row[0])
    for (let i = 0; i < CALIBRATED_CHANNELS.length; i++) {
      const wire = CALIBRATED_CHANNELS[i]!
      const text = field(row, CH0 + i)
      const raw = num(text)
      const v = calibrate(wire, t, raw)
      if (v !== raw && v !== null) {
        const r = round3(v)
        cells.push(r)
        if (wire === 'airTempC') air = r
        else if (wire === 'rhPct') rh = r
        else if (wire === 'panelTempC') panel = r
        if (wire === 'airTempC' || wire === 'rhPct') moved = true
      } else cells.push(text)
    }
    for (let i = CALIBRATED_CHANNELS.length; i < CHANNELS.length; i++) cells.push(field(row, CH0 + i))
  } else {
    for (let i = 0; i < CHANNELS.length; i++) cells.push(field(row, CH0 + i))
  }
  let dew: CsvCell = field(row, DEW)
  let dewNum = num(field(row, DEW))
  if (moved) {
    const dp = air !== null && rh !== null && rh > 0 ? dewPointC(air, Math.min(100, rh)) : Number.NaN
    dewNum = Number.isFinite(dp) ? round2(dp) : null
    dew = dewNum
  }
  const surface = panel ?? air
  cells.push(dew, surface !== null && dewNum !== null ? round2(surface - dewNum) : null, field(row, HEATER))
  if (includeRaw) {
    for (let i = 0; i < CHANNELS.length; i++) cells.push(field(row, CH0 + i))
    cells.push(field(row, DEW))
  }
  return cells
}

// RFC 4180 by hand rather than through csv-stringify: the export writes millions of records, and
// csv-stringify allocated several kB per record, which kept V8's young generation churning (a scavenge every
// ~25 ms). Same output as csv-stringify with delimiter ',', quote and escape '"', CRLF records and lone CR / LF
// quoted (tests/unit/evidence/csv.test.ts checks it against csv-stringify).
const NEEDS_QUOTES = /[",\r\n]/
const QUOTES = /"/g

/** One field: empty for null, numbers as JavaScript prints them, quoted when it holds a comma, a quote, CR or LF. */
export function csvField(v: CsvCell): string {
  if (v === null) return ''
  const s = typeof v === 'number' ? String(v) : v
  return NEEDS_QUOTES.test(s) ? `"${s.replace(QUOTES, '""')}"` : s
}

/** One CSV record, CRLF included. */
export function csvLine(cells: readonly CsvCell[]): string {
  let line = cells.length ? csvField(cells[0] ?? null) : ''
  for (let i = 1; i < cells.length; i++) line += ',' + csvField(cells[i] ?? null)
  return line + '\r\n'
}

/** The file's first chunk: the byte-order mark and the header record. */
export function csvHeader(columns: readonly string[]): string {
  return '\uFEFF' + csvLine(columns)
}
