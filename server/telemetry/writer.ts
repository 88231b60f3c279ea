import type pg from 'pg'
import { insertReadingBatch } from './insert-batch'
import type { ReadingRow } from './reading-row'
import { Spool } from './spool'

export interface WriterOptions {
  pool: pg.Pool
  spoolDir: string
  /** Rows held in memory while the database is away, before the spool file takes over. */
  bufferMax: number
  flushMs?: number
  batchRows?: number
  /** Called when an insert fails for a reason that more waiting will not fix (e.g. missing partition). */
  onInsertError?: (e: unknown) => Promise<void>
}

export interface WriterStats {
  buffered: number
  spooled: number
  stored: number
  duplicates: number
  flushes: number
  failures: number
  databaseUp: boolean
  lastError: string | undefined
  /** Age of the oldest reading not yet stored, ms (0 when none waits). */
  lagMs: number
  lastFlushMs: number
}

/**
 * Batches accepted readings into PostgreSQL: a flush every ~250 ms or every 1,000 rows, one at a
 * time so order is kept. While the database is away rows stay in memory up to bufferMax, then go
 * to the spool; when it returns the memory buffer drains first, then the spool, then normal flow.
 */
export class ReadingWriter {
  private buffer: ReadingRow[] = []
  private head = 0
  private flushing: Promise<void> | undefined
  private timer: NodeJS.Timeout | undefined
  private retryAt = 0
  private backoffMs = 250
  private readonly spool: Spool
  private spooling = false
  private readonly flushMs: number
  private readonly batchRows: number
  private s: Omit<WriterStats, 'buffered' | 'spooled' | 'lagMs'> = {
    stored: 0,
    duplicates: 0,
    flushes: 0,
    failures: 0,
    databaseUp: true,
    lastError: undefined,
    lastFlushMs: 0,
  }

  constructor(private readonly o: WriterOptions) {
    this.spool = new Spool(o.spoolDir)
    this.flushMs = o.flushMs ?? 250
    this.batchRows = o.batchRows ?? 1000
    // Rows spooled before a restart drain before anything new.
    this.spooling = this.spool.hasRows()
  }

  start(): void {
    this.timer ??= setInterval(() => void this.flush(), this.flushMs)
  }

  add(row: ReadingRow): void {
    if (this.spooling || this.pendingInMemory() >= this.o.bufferMax) {
      this.spooling = true
      this.spool.append(row)
      return
    }
    this.buffer.push(row)
    if (this.pendingInMemory() >= this.batchRows && !this.flushing) void this.flush()
  }

  private pendingInMemory(): number {
    return this.buffer.length - this.head
  }

  stats(): WriterStats {
    const oldest = this.buffer[this.head]
    return {
      ...this.s,
      buffered: this.pendingInMemory(),
      spooled: this.spool.pending(),
      lagMs: oldest ? Date.now() - oldest.receivedMs : 0,
    }
  }

  /** Runs one flush cycle (or joins the one under way). */
  flush(): Promise<void> {
    if (!this.flushing) {
      this.flushing = this.cycle().finally(() => {
        this.flushing = undefined
      })
    }
    return this.flushing
  }

  private async write(rows: ReadingRow[]): Promise<void> {
    const started = Date.now()
    try {
      const inserted = await insertReadingBatch(this.o.pool, rows)
      this.s.stored += inserted
      this.s.duplicates += rows.length - inserted
      this.s.flushes++
      this.s.lastFlushMs = Date.now() - started
      this.s.databaseUp = true
      this.s.lastError = undefined
      this.backoffMs = 250
    } catch (e) {
      this.s.failures++
      this.s.databaseUp = false
      this.s.lastError = e instanceof Error ? e.message : String(e)
      this.retryAt = Date.now() + this.backoffMs
      this.backoffMs = Math.min(this.backoffMs * 2, 5_000)
      if (this.o.onInsertError) await this.o.onInsertError(e).catch(() => undefined)
      throw e
    }
  }

  private async cycle(): Promise<void> {
    if (Date.now() < this.retryAt) return
    try {
      while (this.pendingInMemory() > 0) {
        const end = Math.min(this.buffer.length, this.head + this.batchRows * 2)
        const rows = this.buffer.slice(this.head, end)
        await this.write(rows)
        this.head = end
        if (this.head > 50_000 || this.head === this.buffer.length) {
          this.buffer = this.buffer.slice(this.head)
          this.head = 0
        }
      }
      if (this.spooling) {
        await this.spool.drain((rows) => this.write(rows), this.batchRows)
        // Anything spooled while draining went to a newer file; drain until none is left.
        if (!this.spool.hasRows()) this.spooling = false
      }
    } catch {
      // Kept for the next cycle after the back-off; the stats say why.
    }
  }

  /** Flushes what it can and closes the spool. Rows still unsaved stay in the spool on disk. */
  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer)
    this.timer = undefined
    this.retryAt = 0
    await this.flush()
    if (this.pendingInMemory() > 0) {
      for (let i = this.head; i < this.buffer.length; i++) this.spool.append(this.buffer[i]!)
      this.buffer = []
      this.head = 0
    }
    await this.spool.close()
  }
}
