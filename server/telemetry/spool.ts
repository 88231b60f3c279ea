import { createReadStream, createWriteStream, existsSync, mkdirSync, readdirSync, rmSync, type WriteStream } from 'node:fs'
import { join } from 'node:path'
import { createInterface } from 'node:readline'
import type { ReadingRow } from './reading-row'

// Append-only overflow files for readings that arrive while PostgreSQL is away and the memory buffer
// is full. One JSON row per line; files are numbered so they drain oldest first.
export class Spool {
  private stream: WriteStream | undefined
  private current: string | undefined
  private count = 0
  private serial = 0

  constructor(private readonly dir: string) {
    mkdirSync(dir, { recursive: true })
  }

  private files(): string[] {
    if (!existsSync(this.dir)) return []
    return readdirSync(this.dir)
      .filter((f) => /^spool-\d{15}-\d{6}\.ndjson$/.test(f))
      .sort()
      .map((f) => join(this.dir, f))
  }

  /** True while any spooled row waits to be drained (also after a restart). */
  hasRows(): boolean {
    return this.count > 0 || this.files().length > 0
  }

  pending(): number {
    return this.count
  }

  append(row: ReadingRow): void {
    if (!this.stream) {
      this.serial++
      this.current = join(this.dir, `spool-${String(Date.now()).padStart(15, '0')}-${String(this.serial).padStart(6, '0')}.ndjson`)
      this.stream = createWriteStream(this.current, { flags: 'a' })
    }
    this.stream.write(`${JSON.stringify(row)}\n`)
    this.count++
  }

  private async closeCurrent(): Promise<void> {
    const s = this.stream
    this.stream = undefined
    this.current = undefined
    if (s) await new Promise<void>((resolve) => s.end(resolve))
  }

  /**
   * Hands every spooled row, oldest file first, to `sink` in batches; a file is removed only once
   * all its rows were accepted. New rows appended meanwhile go to a newer file and drain after.
   */
  async drain(sink: (rows: ReadingRow[]) => Promise<void>, batch = 1000): Promise<number> {
    await this.closeCurrent()
    let drained = 0
    for (const file of this.files()) {
      const lines = createInterface({ input: createReadStream(file), crlfDelay: Infinity })
      let rows: ReadingRow[] = []
      for await (const line of lines) {
        if (!line.trim()) continue
        try {
          rows.push(JSON.parse(line) as ReadingRow)
        } catch {
          continue // a torn last line after a crash
        }
        if (rows.length >= batch) {
          await sink(rows)
          drained += rows.length
          rows = []
        }
      }
      if (rows.length) {
        await sink(rows)
        drained += rows.length
      }
      rmSync(file, { force: true })
    }
    this.count = Math.max(0, this.count - drained)
    if (!this.files().length) this.count = 0
    return drained
  }

  async close(): Promise<void> {
    await this.closeCurrent()
  }
}
