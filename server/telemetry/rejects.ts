import type pg from 'pg'
import type { RejectReason } from './wire'

// Refused messages: exact counts per booth and reason, and a bounded sample for inspection. Both are
// collected in memory and written every couple of seconds, so a flood of bad input costs no query
// per message.
const SAMPLE_PER_FLUSH = 50
const SAMPLE_KEEP_PER_REASON = 200
const PAYLOAD_KEEP = 2_048

interface Sample {
  boothId: number | null
  topic: string
  reason: RejectReason
  detail: string
  payload: string
}

export class RejectRecorder {
  private counts = new Map<string, number>()
  private samples: Sample[] = []
  private totals = new Map<RejectReason, number>()
  private timer: NodeJS.Timeout | undefined
  private flushes = 0

  constructor(private readonly pool: pg.Pool) {}

  start(): void {
    this.timer ??= setInterval(() => void this.flush().catch(() => undefined), 2_000)
  }

  record(boothKey: string, boothId: number | null, topic: string, reason: RejectReason, detail: string, payload: Buffer): void {
    const key = `${boothKey}\u0000${reason}`
    this.counts.set(key, (this.counts.get(key) ?? 0) + 1)
    this.totals.set(reason, (this.totals.get(reason) ?? 0) + 1)
    if (this.samples.length < SAMPLE_PER_FLUSH) {
      const text = payload.subarray(0, PAYLOAD_KEEP).toString('utf8').replace(/\u0000/g, '')
      this.samples.push({ boothId, topic: topic.slice(0, 300), reason, detail: detail.slice(0, 500), payload: text })
    }
  }

  /** Counts since this process started, by reason. */
  totalsByReason(): Record<string, number> {
    return Object.fromEntries(this.totals)
  }

  async flush(): Promise<void> {
    if (!this.counts.size && !this.samples.length) return
    const counts = this.counts
    const samples = this.samples
    this.counts = new Map()
    this.samples = []
    try {
      const keys = [...counts.keys()].map((k) => k.split('\u0000'))
      await this.pool.query(
        `INSERT INTO rejected_counts (booth_key, reason, count, last_at)
         SELECT b, r, c, now() FROM unnest($1::text[], $2::text[], $3::int8[]) AS t(b, r, c)
         ON CONFLICT (booth_key, reason) DO UPDATE SET count = rejected_counts.count + excluded.count, last_at = now()`,
        [keys.map((k) => k[0]), keys.map((k) => k[1]), [...counts.values()]],
      )
      if (samples.length) {
        await this.pool.query(
          `INSERT INTO rejected_readings (booth_id, topic, reason, detail, payload)
           SELECT * FROM unnest($1::int[], $2::text[], $3::text[], $4::text[], $5::text[])`,
          [samples.map((s) => s.boothId), samples.map((s) => s.topic), samples.map((s) => s.reason), samples.map((s) => s.detail), samples.map((s) => s.payload)],
        )
      }
      if (++this.flushes % 30 === 0) {
        await this.pool.query(
          `DELETE FROM rejected_readings WHERE id IN (
             SELECT id FROM (SELECT id, row_number() OVER (PARTITION BY reason ORDER BY id DESC) AS n FROM rejected_readings) x
             WHERE n > $1)`,
          [SAMPLE_KEEP_PER_REASON],
        )
      }
    } catch {
      // Database away: put the counts back so none is lost; samples are only a sample.
      for (const [k, v] of counts) this.counts.set(k, (this.counts.get(k) ?? 0) + v)
    }
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer)
    this.timer = undefined
    await this.flush()
  }
}
