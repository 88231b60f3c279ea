import { describe, expect, it } from 'vitest'
import { csvLine, type CsvCell } from '../../../server/evidence/csv'
import { CsvBytes } from '../../../server/evidence/csv-bytes'

// CsvBytes writes records straight into a buffer; its bytes must be exactly csvLine's text as UTF-8.
const records: CsvCell[][] = [
  ['2026-11-30T08:00:00.000Z', 'downdraft-1', 'larkspur-1', '7', '21.4', null, -3.5, 0],
  ['a,b', 'say "hi"', 'cr\rhere', 'lf\nhere', ''],
  ['°C and ✓ and 😀 after ASCII', 'ünïcode first', null, null],
  ["'=HYPERLINK(\"x\")", 1e21, 1e-7],
]

describe('CSV records as bytes', () => {
  it('writes the UTF-8 bytes of csvLine, CRLF included, non-ASCII and quoting alike', () => {
    const out = new CsvBytes(1024)
    for (const r of records) out.record(r)
    expect(out.take().toString('utf8')).toBe(records.map(csvLine).join(''))
  })

  it('grows past its first guess and starts afresh after each take', () => {
    const out = new CsvBytes(8)
    const long: CsvCell[] = ['x'.repeat(500), 'é'.repeat(300), 42]
    out.record(long)
    out.record(records[0]!)
    const first = out.take()
    expect(first.toString('utf8')).toBe(csvLine(long) + csvLine(records[0]!))
    expect(first.length).toBe(Buffer.byteLength(csvLine(long) + csvLine(records[0]!)))
    out.record(records[1]!)
    const second = out.take()
    expect(second.toString('utf8')).toBe(csvLine(records[1]!))
    // The first chunk is not overwritten by what came after it.
    expect(first.toString('utf8').startsWith('x'.repeat(500))).toBe(true)
    expect(out.take().length).toBe(0)
  })
})
