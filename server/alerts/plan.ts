// Who gets an e-mail about which alert, and when: pure decisions, so the rules are unit-tested with a fake clock.
//
// For a newly opened alert, in this order:
//   1. already acknowledged or resolved (a deferred mail whose reason passed) → skip: nothing left to act on;
//   2. quiet hours and not critical → defer to the end of quiet hours;
//   3. per-watch rate limit: this watch of this booth was mailed less than rateLimitMs ago → defer until then
//      (a flapping watch sends one mail, not one per flap);
//   4. storm limit: at most digestAfter single alert mails per digestWindowMs (all watches together); any
//      further alert is held and all the held ones go out together in one digest when the window ends;
//   5. else → send now.
// An alert still open (not acknowledged) escalateAfterMs after its mail is mailed again, up to escalateMax times;
// non-critical escalations wait for the end of quiet hours too.

import type { AlertSeverity, AlertState, NotifyState } from '../db/tables/alerts'

export interface QuietHours {
  /** Minutes after local midnight. start > end spans midnight (22:00–06:00). */
  startMin: number
  endMin: number
}

export interface PlanConfig {
  rateLimitMs: number
  digestAfter: number
  digestWindowMs: number
  quietHours: QuietHours | null
  escalateAfterMs: number
  escalateMax: number
}

export interface PlanAlert {
  id: number
  boothId: number
  ruleId: string
  severity: AlertSeverity
  state: AlertState
  notifyState: NotifyState
  /** IANA time zone for quiet hours (the booth's site). */
  timeZone: string
}

export interface PlanContext {
  now: number
  /** Time of the last opening mail of each watch, keyed by watchKey(boothId, ruleId). */
  lastNotified: ReadonlyMap<string, number>
  /** Times of single alert mails already queued within the last digest window. */
  recentSends: readonly number[]
  /** When the digest now being collected goes out, if one is being collected. */
  digestDueAt: number | null
}

export type OpeningDecision =
  | { id: number; action: 'send' }
  | { id: number; action: 'defer'; until: number; reason: 'quiet_hours' | 'rate_limit' }
  | { id: number; action: 'hold'; until: number }
  | { id: number; action: 'skip'; reason: 'acknowledged' | 'resolved' }

export interface OpeningPlan {
  decisions: OpeningDecision[]
  /** Held alerts whose digest is due now, to go out in one mail. */
  digest: number[]
}

export const watchKey = (boothId: number, ruleId: string) => `${boothId}:${ruleId}`

const DAY_S = 86_400

/** "22:00-06:00" → minutes; empty or equal ends → null (no quiet hours). Invalid → null. */
export function parseQuietHours(text: string | null | undefined): QuietHours | null {
  const m = /^\s*(\d{1,2}):(\d{2})\s*[-–]\s*(\d{1,2}):(\d{2})\s*$/.exec(text ?? '')
  if (!m) return null
  const [h1, m1, h2, m2] = [m[1], m[2], m[3], m[4]].map(Number) as [number, number, number, number]
  if (h1 > 23 || h2 > 23 || m1 > 59 || m2 > 59) return null
  const startMin = h1 * 60 + m1
  const endMin = h2 * 60 + m2
  return startMin === endMin ? null : { startMin, endMin }
}

const formatters = new Map<string, Intl.DateTimeFormat>()

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone)
  if (!f) {
    try {
      f = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' })
    } catch {
      f = new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' })
    }
    formatters.set(timeZone, f)
  }
  return f
}

/** Seconds since local midnight in the time zone (unknown zones count as UTC). */
export function localSecondOfDay(nowMs: number, timeZone: string): number {
  const parts = formatterFor(timeZone).formatToParts(new Date(nowMs))
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value ?? 0)
  return (get('hour') % 24) * 3600 + get('minute') * 60 + get('second')
}

/**
 * Whether nowMs lies in quiet hours, and when they end (epoch ms). Computed from the local wall clock, so a
 * daylight-saving change inside the quiet period moves the end by that hour at most.
 */
export function quietState(nowMs: number, quiet: QuietHours | null, timeZone: string): { quiet: false } | { quiet: true; endsAt: number } {
  if (!quiet) return { quiet: false }
  const sec = localSecondOfDay(nowMs, timeZone)
  const min = Math.floor(sec / 60)
  const { startMin, endMin } = quiet
  const inside = startMin < endMin ? min >= startMin && min < endMin : min >= startMin || min < endMin
  if (!inside) return { quiet: false }
  const untilS = (endMin * 60 - sec + DAY_S) % DAY_S
  const ms = nowMs % 1000
  return { quiet: true, endsAt: nowMs - ms + untilS * 1000 }
}

export function planOpenings(candidates: readonly PlanAlert[], ctx: PlanContext, cfg: PlanConfig): OpeningPlan {
  const { now } = ctx
  const decisions: OpeningDecision[] = []
  const digest: number[] = []
  const lastNotified = new Map(ctx.lastNotified)
  const recent = ctx.recentSends.filter((t) => t > now - cfg.digestWindowMs && t <= now)
  let digestDueAt = ctx.digestDueAt

  for (const a of candidates) {
    if (a.notifyState === 'digest') {
      // Its window ended: it goes out with the others held, whatever its state now (the digest reports it).
      digest.push(a.id)
      lastNotified.set(watchKey(a.boothId, a.ruleId), now)
      continue
    }
    if (a.state === 'resolved') {
      decisions.push({ id: a.id, action: 'skip', reason: 'resolved' })
      continue
    }
    if (a.state === 'acknowledged') {
      decisions.push({ id: a.id, action: 'skip', reason: 'acknowledged' })
      continue
    }
    if (a.severity !== 'critical') {
      const q = quietState(now, cfg.quietHours, a.timeZone)
      if (q.quiet) {
        decisions.push({ id: a.id, action: 'defer', until: q.endsAt, reason: 'quiet_hours' })
        continue
      }
    }
    const key = watchKey(a.boothId, a.ruleId)
    const last = lastNotified.get(key)
    if (last !== undefined && cfg.rateLimitMs > 0 && now - last < cfg.rateLimitMs) {
      decisions.push({ id: a.id, action: 'defer', until: last + cfg.rateLimitMs, reason: 'rate_limit' })
      continue
    }
    if (recent.length >= cfg.digestAfter) {
      digestDueAt ??= now + cfg.digestWindowMs
      decisions.push({ id: a.id, action: 'hold', until: digestDueAt })
      // Held alerts count as notified for the rate limit: the digest will carry them.
      lastNotified.set(key, now)
      continue
    }
    decisions.push({ id: a.id, action: 'send' })
    recent.push(now)
    lastNotified.set(key, now)
  }
  return { decisions, digest }
}

export interface EscalationInput {
  severity: AlertSeverity
  state: AlertState
  /** Escalation mails already sent. */
  escalations: number
  timeZone: string
}

export type EscalationDecision =
  | { action: 'escalate'; next: number | null }
  | { action: 'wait'; until: number }
  | { action: 'stop' }

/** For an alert whose escalation time has come. */
export function planEscalation(a: EscalationInput, now: number, cfg: PlanConfig): EscalationDecision {
  if (a.state !== 'open' || a.escalations >= cfg.escalateMax) return { action: 'stop' }
  if (a.severity !== 'critical') {
    const q = quietState(now, cfg.quietHours, a.timeZone)
    if (q.quiet) return { action: 'wait', until: q.endsAt }
  }
  const sent = a.escalations + 1
  return { action: 'escalate', next: sent < cfg.escalateMax ? now + cfg.escalateAfterMs : null }
}

/** When the first escalation is due after an alert's first mail, or null when escalation is off. */
export function firstEscalationAt(notifiedAt: number, cfg: PlanConfig): number | null {
  return cfg.escalateMax > 0 ? notifiedAt + cfg.escalateAfterMs : null
}

/** Exponential backoff for the outbox: base · 2^(attempt−1), with ±20 % jitter, capped at maxMs (rand in [0, 1)). */
export function retryDelayMs(attempt: number, baseMs: number, maxMs: number, rand: number = Math.random()): number {
  const n = Math.max(1, Math.floor(attempt))
  const raw = Math.min(maxMs, baseMs * 2 ** Math.min(30, n - 1))
  const jitter = 0.8 + 0.4 * Math.min(1, Math.max(0, rand))
  return Math.max(0, Math.round(Math.min(maxMs, raw * jitter)))
}

/** Recipients: lower-cased, trimmed, each once, in the order given. */
export function uniqueRecipients(...lists: readonly (readonly string[])[]): string[] {
  const seen = new Set<string>()
  const out: string[] = []
  for (const list of lists) {
    for (const r of list) {
      const e = r.trim().toLowerCase()
      if (!e || seen.has(e)) continue
      seen.add(e)
      out.push(e)
    }
  }
  return out
}
