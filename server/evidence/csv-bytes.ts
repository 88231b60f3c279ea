import { csvField, type CsvCell } from './csv'

// CSV records written as UTF-8 bytes straight into a buffer, one buffer per chunk of the stream: the same
// bytes as csvLine, without a string per record (a long export would make millions of them, each living
// until its chunk is written).

const COMMA = 0x2c
const CR = 0x0d
const LF = 0x0a

export class CsvBytes {
  private buf: Buffer
  private at = 0

  /** `size`: the first guess of a chunk's bytes; the buffer grows when a chunk needs more. */
  constructor(private readonly size: number) {
    this.buf = Buffer.allocUnsafe(size)
  }

  /** Appends one record, CRLF included. */
  record(cells: readonly CsvCell[]): void {
    for (let i = 0; i < cells.length; i++) {
      if (i) this.byte(COMMA)
      const v = cells[i] ?? null
      if (v !== null) this.text(csvField(v))
    }
    this.byte(CR)
    this.byte(LF)
  }

  /** The bytes appended since the last take; the next records go to a new buffer. */
  take(): Buffer {
    const out = this.buf.subarray(0, this.at)
    this.buf = Buffer.allocUnsafe(Math.max(this.size, this.at))
    this.at = 0
    return out
  }

  private byte(b: number): void {
    if (this.at === this.buf.length) this.grow(1)
    this.buf[this.at++] = b
  }

  private text(s: string): void {
    const n = s.length
    // A UTF-16 code unit is at most 3 bytes of UTF-8.
    if (this.at + 3 * n > this.buf.length) this.grow(3 * n)
    const b = this.buf
    let at = this.at
    for (let i = 0; i < n; i++) {
      const c = s.charCodeAt(i)
      if (c >= 0x80) {
        // Not ASCII from here on: let Buffer encode the rest (surrogate pairs and all).
        this.at = at + b.write(s.slice(i), at, 'utf8')
        return
      }
      b[at++] = c
    }
    this.at = at
  }

  private grow(need: number): void {
    const next = Buffer.allocUnsafe(Math.max(2 * this.buf.length, this.at + need))
    this.buf.copy(next, 0, 0, this.at)
    this.buf = next
  }
}
