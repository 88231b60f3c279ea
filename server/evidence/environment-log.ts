import { Readable } from 'node:stream'
import type { Kysely } from 'kysely'
import type pg from 'pg'
import type { Database } from '../db/database'
import { applyCalibration, calibrationsReady, hasCalibrations } from '../domain/calibration'
import { decodeReadings, readingPage, type ReadingPage } from '../repositories/exports'
import { csvColumns, csvHeader, csvRecord, type Calibrate, type CsvCell } from './csv'
import { CsvBytes } from './csv-bytes'
import type { BoothRef } from './types'

// The environment log of booths over a period as a stream of CSV bytes, in flat memory whatever the
// period: readings are read a page at a time (keyset on the booth's (booth_id, ts) key), each page written
// as one chunk, and the next page read only when the consumer has taken the previous ones (Readable
// backpressure: _read is not called while HIGH_WATER bytes wait). The next page is fetched while the current
// one is written, so the round trips do not add up.
//
// Each page arrives as one string (see readingPage) and each reading becomes a few short-lived strings on
// its way to the page's chunk, so no object outlives its page. That alone did not keep resident memory flat:
// V8's allocation-site pretenuring still sent them to the old generation; server/plugins/00.allocation-sites.ts
// turns it off (bench:export: +5.5 MiB on 30 days, +6.0 MiB on 60).

/** Readings per page: one query and one chunk of the stream each. */
export const PAGE_SIZE = 1000
const HIGH_WATER = 1 << 20
/** A first guess of a record's bytes (about 115 without calibrations, 180 with). */
const BYTES_PER_RECORD = 160

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
  private ahead: { booth: BoothRef; page: Promise<ReadingPage> } | null = null
  rows = 0
  /** Reused for every record: nothing per record outlives it. */
  private readonly cells: CsvCell[] = []
  private readonly out: CsvBytes

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
    this.out = new CsvBytes(pageSize * BYTES_PER_RECORD)
  }

  override _read(): void {
    if (!this.headerSent) {
      this.headerSent = true
      this.push(csvHeader(this.header), 'utf8')
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
    const page = readingPage(this.pool, booth.id, this.from, this.to, after, this.pageSize)
    page.catch(() => undefined) // awaited (and its error raised) by nextPage, unless the stream is gone by then
    this.ahead = { booth, page }
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
      const { booth, page } = this.ahead!
      const { encoded, lastKey } = await page
      if (this.destroyed) return
      const readings = decodeReadings(encoded)
      this.ahead = null
      if (readings.length === this.pageSize && lastKey !== null) this.ask(booth, lastKey)
      else this.boothIndex++
      if (!readings.length) continue
      const calibrate: Calibrate = hasCalibrations(booth.id) ? (ch, t, v) => applyCalibration(booth.id, ch, t, v) : null
      for (const r of readings) this.out.record(csvRecord(r, booth.slug, calibrate, this.includeRaw, this.cells))
      this.rows += readings.length
      this.push(this.out.take())
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
