// Turns alert openings and unacknowledged alerts into outbox mails, following the plan in ./plan.ts. Each round
// locks the alerts it decides on (FOR UPDATE SKIP LOCKED), so several instances never mail the same alert twice,
// and writes the decision and the mail in one transaction.

import type { Kysely } from 'kysely'
import type { Database } from '../db/database'
import {
  lastNotifiedByWatch,
  lockDueEscalations,
  lockDueNotifications,
  nextDigestDue,
  setEscalation,
  setNotifyState,
  type AlertDetailRow,
} from '../repositories/alerts'
import { enqueueMail, recentAlertMailTimes } from '../repositories/outbox'
import { listUsersByRole } from '../repositories/users'
import { renderAlertMail, renderDigestMail, type MailAlert, type RenderOptions } from '../mail/render'
import {
  firstEscalationAt,
  planEscalation,
  planOpenings,
  uniqueRecipients,
  watchKey,
  type PlanAlert,
  type PlanConfig,
} from './plan'

export interface NotifierConfig {
  plan: PlanConfig
  publicUrl: string
  /** Overrides the sites' own time zones for quiet hours and times in mails. */
  timeZone?: string
  batch?: number
}

const toDate = (ms: number | null) => (ms === null ? null : new Date(ms))

export function toMailAlert(r: AlertDetailRow): MailAlert {
  return {
    id: r.id,
    kind: r.kind,
    ruleId: r.rule_id,
    label: r.label,
    severity: r.severity,
    channel: r.channel,
    message: r.message,
    value: r.value,
    limit: r.limit_value,
    peak: r.peak,
    openedAt: r.opened_at,
    state: r.state,
    clearedAt: r.cleared_at,
    boothName: r.booth_name,
    siteName: r.site_name,
  }
}

export class Notifier {
  private running: Promise<void> | null = null

  constructor(
    private readonly db: Kysely<Database>,
    private readonly cfg: NotifierConfig,
    private readonly onQueued?: () => void,
  ) {}

  /** One round (rounds never overlap). */
  run(now = Date.now()): Promise<void> {
    if (this.running) return this.running
    this.running = (async () => {
      try {
        const queued = (await this.openings(now)) + (await this.escalations(now))
        if (queued) this.onQueued?.()
      } catch (e) {
        console.warn('[alerts] notification round failed:', e instanceof Error ? e.message : e)
      } finally {
        this.running = null
      }
    })()
    return this.running
  }

  private zone(r: AlertDetailRow): string {
    return this.cfg.timeZone ?? r.time_zone ?? 'UTC'
  }

  private render(r: AlertDetailRow): RenderOptions {
    return { publicUrl: this.cfg.publicUrl, timeZone: this.zone(r) }
  }

  private async managers(db: Kysely<Database>): Promise<string[]> {
    const users = await listUsersByRole(db, ['admin', 'manager'])
    return users.map((u) => u.email)
  }

  private async openings(nowMs: number): Promise<number> {
    const cfg = this.cfg.plan
    const now = new Date(nowMs)
    return this.db.transaction().execute(async (tx) => {
      const due = await lockDueNotifications(tx, now, this.cfg.batch ?? 100)
      if (!due.length) return 0
      const since = new Date(nowMs - Math.max(cfg.rateLimitMs, 1))
      const last = await lastNotifiedByWatch(tx, since)
      const recent = await recentAlertMailTimes(tx, new Date(nowMs - cfg.digestWindowMs))
      const digestDue = await nextDigestDue(tx, now)
      const managers = await this.managers(tx)

      const candidates: PlanAlert[] = due.map((r) => ({
        id: r.id,
        boothId: r.booth_id,
        ruleId: r.rule_id,
        severity: r.severity,
        state: r.state,
        notifyState: r.notify_state,
        timeZone: this.zone(r),
      }))
      const plan = planOpenings(
        candidates,
        {
          now: nowMs,
          lastNotified: new Map(last.map((l) => [watchKey(l.booth_id, l.rule_id), l.at.getTime()])),
          recentSends: recent.map((d) => d.getTime()),
          digestDueAt: digestDue?.getTime() ?? null,
        },
        cfg,
      )

      let queued = 0
      const byId = new Map(due.map((r) => [r.id, r]))
      for (const d of plan.decisions) {
        const r = byId.get(d.id)
        if (!r) continue
        if (d.action === 'send') {
          const to = uniqueRecipients(managers, r.recipients)
          if (!to.length) {
            await setNotifyState(tx, [r.id], { state: 'skipped' })
            continue
          }
          const mail = renderAlertMail(toMailAlert(r), this.render(r))
          await enqueueMail(tx, { kind: 'alert', alertId: r.id, alertIds: [r.id], recipients: to, ...mail, now })
          await setNotifyState(tx, [r.id], { state: 'sent', notifiedAt: now, nextEscalationAt: toDate(firstEscalationAt(nowMs, cfg)) })
          queued++
        } else if (d.action === 'defer') {
          await setNotifyState(tx, [r.id], { state: 'deferred', dueAt: new Date(d.until) })
        } else if (d.action === 'hold') {
          await setNotifyState(tx, [r.id], { state: 'digest', dueAt: new Date(d.until) })
        } else {
          await setNotifyState(tx, [r.id], { state: 'skipped' })
        }
      }
      if (plan.digest.length) queued += await this.sendDigest(tx, plan.digest.map((id) => byId.get(id)).filter((r): r is AlertDetailRow => !!r), managers, nowMs)
      return queued
    })
  }

  /**
   * The held alerts in one mail to the managers; an extra recipient of a watch gets a digest of just the alerts
   * of the watches they follow. A "digest" of one alert is sent as that alert's own mail.
   */
  private async sendDigest(tx: Kysely<Database>, rows: AlertDetailRow[], managers: string[], nowMs: number): Promise<number> {
    const cfg = this.cfg.plan
    const now = new Date(nowMs)
    const groups = new Map<string, { to: string[]; rows: AlertDetailRow[] }>()
    const add = (email: string, list: AlertDetailRow[]) => {
      const key = list.map((r) => r.id).join(',')
      const g = groups.get(key)
      if (g) g.to.push(email)
      else groups.set(key, { to: [email], rows: list })
    }
    const managerSet = new Set(uniqueRecipients(managers))
    for (const m of managerSet) add(m, rows)
    for (const extra of uniqueRecipients(...rows.map((r) => r.recipients))) {
      if (managerSet.has(extra)) continue
      add(extra, rows.filter((r) => uniqueRecipients(r.recipients).includes(extra)))
    }
    const options = rows[0] ? this.render(rows[0]) : { publicUrl: this.cfg.publicUrl, timeZone: 'UTC' }
    let queued = 0
    for (const g of groups.values()) {
      const single = g.rows.length === 1 ? g.rows[0] : undefined
      const mail = single ? renderAlertMail(toMailAlert(single), this.render(single)) : renderDigestMail(g.rows.map(toMailAlert), options)
      await enqueueMail(tx, {
        kind: single ? 'alert' : 'digest',
        alertId: single ? single.id : null,
        alertIds: g.rows.map((r) => r.id),
        recipients: g.to,
        ...mail,
        now,
      })
      queued++
    }
    const open = rows.filter((r) => r.state === 'open').map((r) => r.id)
    const others = rows.filter((r) => r.state !== 'open').map((r) => r.id)
    await setNotifyState(tx, open, { state: 'sent', notifiedAt: now, nextEscalationAt: toDate(firstEscalationAt(nowMs, cfg)) })
    await setNotifyState(tx, others, { state: 'sent', notifiedAt: now })
    return queued
  }

  private async escalations(nowMs: number): Promise<number> {
    const cfg = this.cfg.plan
    const now = new Date(nowMs)
    return this.db.transaction().execute(async (tx) => {
      const due = await lockDueEscalations(tx, now, this.cfg.batch ?? 100)
      if (!due.length) return 0
      const managers = await this.managers(tx)
      let queued = 0
      for (const r of due) {
        const d = planEscalation({ severity: r.severity, state: r.state, escalations: r.escalations, timeZone: this.zone(r) }, nowMs, cfg)
        if (d.action === 'stop') {
          await setEscalation(tx, r.id, { nextAt: null })
          continue
        }
        if (d.action === 'wait') {
          await setEscalation(tx, r.id, { nextAt: new Date(d.until) })
          continue
        }
        const to = uniqueRecipients(managers, r.recipients)
        if (to.length) {
          const mail = renderAlertMail(toMailAlert(r), this.render(r), {
            count: r.escalations + 1,
            unacknowledgedMs: nowMs - r.created_at.getTime(),
          })
          await enqueueMail(tx, { kind: 'escalation', alertId: r.id, alertIds: [r.id], recipients: to, ...mail, now })
          queued++
        }
        await setEscalation(tx, r.id, { escalations: r.escalations + 1, nextAt: d.next === null ? null : new Date(d.next) })
      }
      return queued
    })
  }
}
