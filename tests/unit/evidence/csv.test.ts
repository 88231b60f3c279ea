import { describe, expect, it } from 'vitest'
import { parse } from 'csv-parse/sync'
import { stringify } from 'csv-stringify/sync'
import { csvColumns, csvField, csvHeader, csvLine, csvRecord, neutraliseText, type CsvCell, type ExportReading } from '../../../server/evidence/csv'

// As the export writes it: the header chunk with the byte-order mark, then the records.
const toCsv = (header: string[], records: CsvCell[][] = []) => csvHeader(header) + records.map(csvLine).join('')

interface Fields {
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
  heater_on: string | null
  dew_point_c: string | null
}
const row = (over: Partial<Fields> = {}): ExportReading => {
  const f: Fields = {
    ts_iso: '2026-11-30T08:00:00.000Z',
    device_id: 'larkspur-downdraft-1',
    seq: '7',
    air_temp_c: '21.4',
    rh_pct: '50',
    panel_temp_c: null,
    airflow_mps: '0.41',
    booth_dp_pa: '-3.5',
    intake_filter_dp_pa: '95',
    exhaust_filter_dp_pa: '140',
    heater_on: 'false',
    dew_point_c: '10.6',
    ...over,
  }
  return [f.ts_iso, f.device_id, f.seq, f.air_temp_c, f.rh_pct, f.panel_temp_c, f.airflow_mps, f.booth_dp_pa, f.intake_filter_dp_pa, f.exhaust_filter_dp_pa, f.heater_on, f.dew_point_c]
}
const none = null

describe('environment log CSV (RFC 4180)', () => {
  it('ends every record with CRLF and quotes fields with a comma, a quote, CR or LF, doubling quotes', () => {
    const text = toCsv(['a,b', 'say "hi"', 'cr\rhere', 'lf\nhere', 'plain'], [['x', 'y', 'z', 'w', 'v']])
    // Source: RFC 4180 §2 rules 1, 2, 6 and 7.
    expect(text).toBe('\uFEFF"a,b","say ""hi""","cr\rhere","lf\nhere",plain\r\nx,y,z,w,v\r\n')
    // Outside quoted fields, the only line breaks are the CRLF record ends.
    const outside = text.replace(/"[^"]*(""[^"]*)*"/g, '')
    expect(outside.split('\r\n').join('')).not.toMatch(/[\r\n]/)
  })

  it('writes what csv-stringify writes with the RFC 4180 options (delimiter, quote, CRLF, lone CR / LF quoted)', () => {
    // csv-stringify 6 is the reference: the export formats by hand only to allocate less per record.
    const ALPHABET = ['a', 'Z', '0', ',', '"', '\r', '\n', '\t', ' ', '=', '-', '\'', '°', '✓', '\\', ';']
    let seed = 7
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648)
    const cell = (): CsvCell => {
      const r = rnd()
      if (r < 0.15) return null
      if (r < 0.4) return [0, -0, 1.5, -3.5, 21.400000000000002, 1e-7, 7.0727386e8, 1e21, -12.34][Math.floor(rnd() * 9)]!
      return Array.from({ length: Math.floor(rnd() * 6) }, () => ALPHABET[Math.floor(rnd() * ALPHABET.length)]).join('')
    }
    const records = Array.from({ length: 2000 }, () => Array.from({ length: 1 + Math.floor(rnd() * 5) }, cell))
    const reference = stringify(records, { delimiter: ',', quote: '"', escape: '"', record_delimiter: '\r\n', quoted_match: /[\r\n]/, cast: { number: (v) => String(v) } })
    expect(records.map(csvLine).join('')).toBe(reference)
    expect(csvHeader(['a [°C]', 'b,c'])).toBe(stringify([['a [°C]', 'b,c']], { bom: true, record_delimiter: '\r\n' }))
  })

  it('starts with a UTF-8 byte-order mark and has a header row with units', () => {
    const cols = csvColumns(false)
    expect(cols).toContain('air_temp_c [°C]')
    expect(cols).toContain('rh_pct [%]')
    expect(cols).toContain('airflow_mps [m/s]')
    expect(cols[0]).toBe('time_utc [ISO 8601]')
    const buf = Buffer.from(toCsv(cols), 'utf8')
    expect([...buf.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf])
  })

  it('neutralises text cells that a spreadsheet would run as formulas (OWASP CSV injection)', () => {
    for (const bad of ['=1+1', '+cmd', '-2+3', '@SUM(A1)', '\tx', '\rx']) expect(neutraliseText(bad)).toBe(`'${bad}`)
    for (const ok of ['larkspur-1', 'a=b', '', "'quoted"]) expect(neutraliseText(ok)).toBe(ok)
  })

  it('leaves numbers untouched (a negative pressure stays a number) but guards text cells', () => {
    const rec = csvRecord(row({ device_id: '=HYPERLINK("http://x","y")' }), '@booth', none, false)
    const cols = csvColumns(false)
    expect(rec[cols.indexOf('booth_dp_pa [Pa]')]).toBe('-3.5')
    expect(rec[cols.indexOf('device_id')]).toBe(`'=HYPERLINK("http://x","y")`)
    expect(rec[cols.indexOf('booth')]).toBe("'@booth")
    const text = toCsv(cols, [rec])
    const [, parsed] = parse(text, { bom: true }) as string[][]
    expect(parsed![cols.indexOf('booth_dp_pa [Pa]')]).toBe('-3.5')
    expect(parsed![cols.indexOf('device_id')]).toBe(`'=HYPERLINK("http://x","y")`)
    expect(text).toContain(`"'=HYPERLINK(""http://x"",""y"")"`)
  })

  it('writes ISO 8601 UTC times, empty cells for missing values, true/false for the heater', () => {
    const cols = csvColumns(false)
    const rec = csvRecord(row({ heater_on: 'true' }), 'downdraft-1', none, false)
    expect(rec[0]).toBe('2026-11-30T08:00:00.000Z')
    expect(rec[cols.indexOf('panel_temp_c [°C]')]).toBeNull()
    expect(rec[cols.indexOf('heater_on [true/false]')]).toBe('true')
    // Margin = air (no panel sensor) − dew point.
    expect(rec[cols.indexOf('dew_point_margin_c [°C]')]).toBeCloseTo(21.4 - 10.6, 6)
  })

  it('applies calibration offsets, recomputes the dew point and keeps the raw values beside them', () => {
    const cols = csvColumns(true)
    const plus = (c: string, t: number, v: number | null) => (v === null || t !== Date.parse('2026-11-30T08:00:00.000Z') ? v : c === 'airTempC' ? v + 0.3 : v)
    const rec = csvRecord(row(), 'downdraft-1', plus, true)
    expect(rec[cols.indexOf('air_temp_c [°C]')]).toBe(21.7)
    expect(rec[cols.indexOf('rh_pct [%]')]).toBe('50')
    expect(rec[cols.indexOf('air_temp_c_raw [°C]')]).toBe('21.4')
    expect(rec[cols.indexOf('dew_point_c_raw [°C]')]).toBe('10.6')
    // Dew point of 21.7 °C / 50 %: 10.82 °C (Magnus form, a = 17.625, b = 243.04 °C, Alduchov & Eskridge 1996; worked by hand).
    expect(rec[cols.indexOf('dew_point_c [°C]')] as number).toBeCloseTo(10.82, 1)
    expect(rec).toHaveLength(cols.length)
  })
})
