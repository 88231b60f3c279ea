// The API shape of an alert (list, detail, live stream).

import type { AlertDetailRow } from '../repositories/alerts'
import { kindLabel, safetyWords } from './kinds'

export interface AlertView {
  id: number
  boothId: number
  boothName: string
  siteName: string
  timeZone: string
  ruleId: string
  kind: string
  /** The watch's own name, when the manager gave one; else use kindLabel. */
  label: string | null
  kindLabel: string
  severity: 'critical' | 'warning'
  channel: string | null
  unit: string | null
  state: 'open' | 'acknowledged' | 'resolved'
  message: string
  clearMessage: string | null
  /** Value when the alert opened, in `unit`. */
  value: number | null
  limit: number | null
  /** Worst value of the excursion (known at open, final once cleared). */
  peak: number | null
  /** Value when it cleared. */
  lastValue: number | null
  openedAt: string
  clearedAt: string | null
  acknowledgedAt: string | null
  acknowledgedBy: { id: number; name: string } | null
  acknowledgeNote: string | null
  resolvedAt: string | null
  resolvedBy: { id: number; name: string } | null
  resolution: 'cleared' | 'manual' | 'watch_removed' | null
  resolveNote: string | null
  /** Open to cleared (or to resolved, or to now while the condition lasts), in ms. */
  durationMs: number
  safety: string | null
  notification: { state: string; notifiedAt: string | null; escalations: number; nextEscalationAt: string | null }
}

const iso = (d: Date | null) => (d ? d.toISOString() : null)

export function toAlertView(r: AlertDetailRow, nowMs = Date.now()): AlertView {
  const opened = r.opened_at.getTime()
  const end = r.cleared_at?.getTime() ?? r.resolved_at?.getTime() ?? nowMs
  return {
    id: r.id,
    boothId: r.booth_id,
    boothName: r.booth_name,
    siteName: r.site_name,
    timeZone: r.time_zone,
    ruleId: r.rule_id,
    kind: r.kind,
    label: r.label,
    kindLabel: kindLabel(r.kind),
    severity: r.severity,
    channel: r.channel,
    unit: r.unit,
    state: r.state,
    message: r.message,
    clearMessage: r.clear_message,
    value: r.value,
    limit: r.limit_value,
    peak: r.peak,
    lastValue: r.last_value,
    openedAt: r.opened_at.toISOString(),
    clearedAt: iso(r.cleared_at),
    acknowledgedAt: iso(r.acknowledged_at),
    acknowledgedBy: r.acknowledged_by !== null ? { id: r.acknowledged_by, name: r.acknowledged_by_name ?? '' } : null,
    acknowledgeNote: r.ack_note,
    resolvedAt: iso(r.resolved_at),
    resolvedBy: r.resolved_by !== null ? { id: r.resolved_by, name: r.resolved_by_name ?? '' } : null,
    resolution: r.resolution,
    resolveNote: r.resolve_note,
    durationMs: Math.max(0, end - opened),
    safety: safetyWords(r.kind),
    notification: {
      state: r.notify_state,
      notifiedAt: iso(r.notified_at),
      escalations: r.escalations,
      nextEscalationAt: iso(r.next_escalation_at),
    },
  }
}
