// Sends what the outbox holds. A mail is claimed with a lease (SKIP LOCKED, so instances share the work), sent
// over SMTP, and marked sent; a failure is retried with exponential backoff, so an SMTP server that is down
// delays the mail but never loses it. After OUTBOX_MAX_ATTEMPTS it is marked failed (kept, with the last error).

import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import { retryDelayMs } from '../alerts/plan'
import { claimDueMail, markMailFailed, markMailRetry, markMailSent } from '../repositories/outbox'
import type { MailSender } from './transport'

export interface OutboxWorkerConfig {
  from: string
  retryBaseMs: number
  retryMaxMs: number
  maxAttempts: number
  /** How long a claimed mail stays reserved for this worker. */
  leaseMs?: number
  batch?: number
}

export class OutboxWorker {
  private running: Promise<number> | null = null

  constructor(
    private readonly db: Kysely<Database>,
    private readonly sender: MailSender,
    private readonly cfg: OutboxWorkerConfig,
  ) {}

  /** Sends the mails due now; resolves to how many were sent. Rounds never overlap. */
  run(now = Date.now()): Promise<number> {
    if (this.running) return this.running
    this.running = this.round(now)
      .catch((e: unknown) => {
        console.warn('[mail] outbox round failed:', e instanceof Error ? e.message : e)
        return 0
      })
      .finally(() => {
        this.running = null
      })
    return this.running
  }

  private async round(nowMs: number): Promise<number> {
    const lease = this.cfg.leaseMs ?? 120_000
    const rows = await claimDueMail(this.db, new Date(nowMs), new Date(nowMs + lease), this.cfg.batch ?? 20)
    let sent = 0
    for (const row of rows) {
      try {
        const info = await this.sender.send({
          from: this.cfg.from,
          to: row.recipients,
          subject: row.subject,
          text: row.text_body,
          html: row.html_body,
          headers: {
            'X-Boothbeat-Outbox': String(row.id),
            ...(row.alert_id !== null && { 'X-Boothbeat-Alert': String(row.alert_id) }),
            'X-Boothbeat-Kind': row.kind,
          },
        })
        await markMailSent(this.db, row.id, info.messageId, new Date())
        sent++
      } catch (e) {
        const message = e instanceof Error ? e.message : String(e)
        if (row.attempts >= this.cfg.maxAttempts) {
          await markMailFailed(this.db, row.id, message)
          console.warn(`[mail] gave up on mail ${row.id} after ${row.attempts} attempts: ${message}`)
        } else {
          const delay = retryDelayMs(row.attempts, this.cfg.retryBaseMs, this.cfg.retryMaxMs)
          await markMailRetry(this.db, row.id, message, new Date(Date.now() + delay))
        }
      }
    }
    return sent
  }
}
