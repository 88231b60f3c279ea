import { Readable } from 'node:stream'
import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import { applyCalibration, calibrationsReady, hasCalibrations } from '../domain/calibration'
import { readingPage } from '../repositories/exports'
import { csvColumns, csvRecord, csvText, type CsvCell } from './csv'
import type { BoothRef } from './types'

// The environment log of booths over a period as a stream of CSV bytes, in flat memory whatever the
// period: readings are read a page at a time (keyset on the booth's (booth_id, ts) key, PAGE_SIZE rows),
// each page written through csv-stringify as one chunk, and the next page read only when the consumer has
// taken the previous ones (Readable backpressure: _read is not called while HIGH_WATER bytes wait). At most
// a page of rows and a couple of page-sized chunks are held at any moment.

export const PAGE_SIZE = 5_000
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
  private after: string | null = null
  private headerSent = false
  private busy = false
  rows = 0

  constructor(
    private readonly db: Kysely<Database>,
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

  private async nextPage(): Promise<void> {
    for (;;) {
      const booth = this.booths[this.boothIndex]
      if (!booth) {
        this.push(null)
        return
      }
      const page = await readingPage(this.db, booth.id, this.from, this.to, this.after, this.pageSize)
      if (this.destroyed) return
      if (page.length < this.pageSize) {
        this.boothIndex++
        this.after = null
      } else this.after = page[page.length - 1]!.ts_key
      if (!page.length) continue
      const calibrate = (ch: Parameters<typeof applyCalibration>[1], t: number, v: number | null) => applyCalibration(booth.id, ch, t, v)
      const records: CsvCell[][] = page.map((r) => csvRecord(r, booth.slug, calibrate, this.includeRaw))
      this.rows += records.length
      this.push(csvText(records), 'utf8')
      return
    }
  }
}

export async function environmentLog(db: Kysely<Database>, booths: readonly BoothRef[], from: Date, to: Date, pageSize = PAGE_SIZE): Promise<EnvironmentLog> {
  await calibrationsReady(db)
  const includeRaw = booths.some((b) => hasCalibrations(b.id))
  const columns = csvColumns(includeRaw)
  const stream = new EnvironmentLogStream(db, booths, from, to, columns, includeRaw, pageSize)
  return { stream, columns, rows: () => stream.rows }
}
