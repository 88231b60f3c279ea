import { describe, expect, it } from 'vitest'
import { decodeReadings } from '../../../server/repositories/exports'

// The export reads a page of readings as one text value (server/repositories/exports.ts, PAGE_SQL): readings
// separated by LF, fields by TAB, null as an empty field, the device id's \ TAB LF escaped as \\ \t \n.
const line = (device: string, seq = '7', air = '21.4') =>
  ['2026-11-30T08:00:00.000Z', device, seq, air, '50', '', '0.41', '-3.5', '95', '140', 'false', '10.6'].join('\t')

describe('a page of readings as the database sends it', () => {
  it('gives one tuple per line, empty fields as null', () => {
    const page = decodeReadings([line('larkspur-1'), line('larkspur-1', '', '')].join('\n'))
    expect(page).toEqual([
      ['2026-11-30T08:00:00.000Z', 'larkspur-1', '7', '21.4', '50', null, '0.41', '-3.5', '95', '140', 'false', '10.6'],
      ['2026-11-30T08:00:00.000Z', 'larkspur-1', null, null, '50', null, '0.41', '-3.5', '95', '140', 'false', '10.6'],
    ])
  })

  it('restores a device id holding backslashes, TABs and LFs, and keeps an empty one', () => {
    // As SQL escapes it: backslash first, then TAB and LF.
    const escape = (s: string) => s.replace(/\\/g, '\\\\').replace(/\t/g, '\\t').replace(/\n/g, '\\n')
    for (const device of ['a\\b', 'tab\there', 'lf\nhere', '\\t literally', 'end\\', '\\\\n', 'cr\rx', '']) {
      expect(decodeReadings(line(escape(device)))[0]![1]).toBe(device)
    }
  })

  it('reads an empty page as no readings, and refuses a line of the wrong shape', () => {
    expect(decodeReadings(null)).toEqual([])
    expect(() => decodeReadings('a\tb')).toThrow(/fields/)
  })
})
