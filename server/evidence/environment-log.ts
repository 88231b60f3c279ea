import { Readable } from 'node:stream'
import type { Kysely } from 'kysely'
import type pg from 'pg'
import type { Database } from '../db/database'
import { applyCalibration, calibrationsReady, hasCalibrations } from '../domain/calibration'
import { readingPage, type ReadingPageRow } from '../repositories/exports'
import { csvColumns, csvRecord, csvText, type Calibrate, type CsvCell } from './csv'
import type { BoothRef } from './types'

// The environment log of booths over a period as a stream of CSV bytes, in flat memory whatever the
// period: readings are read a page at a time (keyset on the booth's (booth_id, ts) key), each page written
// through csv-stringify in slices, and the next page read only when the consumer has taken the previous
// ones (Readable backpressure: _read is not called while HIGH_WATER bytes wait).
//
// Page size is small on purpose. A page's rows live while the page is written out; when that takes about as
// much allocation as V8's young generation holds, a scavenge keeps finding nearly all of the rows of their
// allocation site alive, V8 starts allocating them straight into the old generation ("pretenuring") and the
// old generation then fills with dead rows up to its limit (measured in the server: +200 MB on a 30-day
// export, with 500-row pages). With 100-row pages the rows die young. The next page is fetched while the
// current one is written, so the round trips do not add up.

export const PAGE_SIZE = 100
/** Records per csv-stringify call. */
const SLICE = 100
const HIGH_WATER = 1 << 20

export interface EnvironmentLog {
  stream: Readable
  columns: string[]
  /** Data rows streamed so far (all of them once the stream has ended). */
  rows(): number
}

/** CSV bytes (header first) of the booths' readings, one booth after the other, time-ordered. */
class EnvironmentLogStream extends Readable {
  private boothIndex = 0
  private headerSent = false
  private busy = false
  /** The next page, already asked for (its booth, and the query). */
  private ahead: { booth: BoothRef; rows: Promise<ReadingPageRow[]> } | null = null
  rows = 0

  constructor(
    private readonly pool: pg.Pool,
    private readonly booths: readonly BoothRef[],
    private readonly from: Date,
    private readonly to: Date,
    private readonly header: string[],
    private readonly includeRaw: boolean,
    private readonly pageSize: number,
  ) {
    super({ highWaterMark: HIGH_WATER })
  }

  override _read(): void {
    if (!this.headerSent) {
      this.headerSent = true
      this.push(csvText([this.header], { bom: true }), 'utf8')
      return
    }
    if (this.busy) return
    this.busy = true
    this.nextPage().then(
      () => {
        this.busy = false
      },
      (e: unknown) => this.destroy(e instanceof Error ? e : new Error(String(e))),
    )
  }

  override _destroy(err: Error | null, cb: (e?: Error | null) => void): void {
    this.ahead = null
    cb(err)
  }

  private ask(booth: BoothRef, after: string | null) {
    const rows = readingPage(this.pool, booth.id, this.from, this.to, after, this.pageSize)
    rows.catch(() => undefined) // awaited (and its error raised) by nextPage, unless the stream is gone by then
    this.ahead = { booth, rows }
  }

  private async nextPage(): Promise<void> {
    for (;;) {
      if (!this.ahead) {
        const booth = this.booths[this.boothIndex]
        if (!booth) {
          this.push(null)
          return
        }
        this.ask(booth, null)
      }
      const { booth, rows } = this.ahead!
      const page = await rows
      if (this.destroyed) return
      this.ahead = null
      if (page.length === this.pageSize) this.ask(booth, page[page.length - 1]!.ts_key)
      else this.boothIndex++
      if (!page.length) continue
      const calibrate: Calibrate = hasCalibrations(booth.id) ? (ch, t, v) => applyCalibration(booth.id, ch, t, v) : null
      for (let i = 0; i < page.length; i += SLICE) {
        const records: CsvCell[][] = []
        for (let j = i; j < Math.min(page.length, i + SLICE); j++) records.push(csvRecord(page[j]!, booth.slug, calibrate, this.includeRaw))
        this.rows += records.length
        this.push(csvText(records), 'utf8')
      }
      return
    }
  }
}

/** `db` loads the calibrations; the readings are read through `pool` (see readingPage). */
export async function environmentLog(
  db: Kysely<Database>,
  pool: pg.Pool,
  booths: readonly BoothRef[],
  from: Date,
  to: Date,
  pageSize = PAGE_SIZE,
): Promise<EnvironmentLog> {
  await calibrationsReady(db)
  const includeRaw = booths.some((b) => hasCalibrations(b.id))
  const columns = csvColumns(includeRaw)
  const stream = new EnvironmentLogStream(pool, booths, from, to, columns, includeRaw, pageSize)
  return { stream, columns, rows: () => stream.rows }
}
