// Alert e-mails: subject, plain-text part and HTML part. Pure, so the wording is unit-tested; the outbox stores
// what this returns and the worker sends it as it is.

import type { AlertSeverity, AlertState } from '../db/tables/alerts'
import { formatAlertValue, kindLabel, safetyWords, formatSeconds } from '../alerts/kinds'

export interface MailAlert {
  id: number
  kind: string
  ruleId: string
  /** The watch's own label, when the manager gave one. */
  label?: string | null
  severity: AlertSeverity
  channel: string | null
  message: string
  value: number | null
  limit: number | null
  peak: number | null
  openedAt: Date
  state: AlertState
  clearedAt: Date | null
  boothName: string
  siteName: string
}

export interface RenderOptions {
  publicUrl: string
  /** IANA zone the times are shown in (the booth's site). */
  timeZone: string
}

export interface Escalation {
  /** 1 for the first reminder. */
  count: number
  /** How long the alert has gone without acknowledgement. */
  unacknowledgedMs: number
}

export interface RenderedMail {
  subject: string
  text: string
  html: string
}

export function alertLink(publicUrl: string, id: number): string {
  return `${publicUrl.replace(/\/+$/, '')}/alerts/${id}`
}

export function escapeHtml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;')
}

/** "2026-03-14 06:05:09 (Europe/Berlin)". Unknown zones fall back to UTC. */
export function formatLocalTime(d: Date, timeZone: string): string {
  let zone = timeZone
  let f: Intl.DateTimeFormat
  try {
    f = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' })
  } catch {
    zone = 'UTC'
    f = new Intl.DateTimeFormat('en-CA', { timeZone: 'UTC', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' })
  }
  const p = Object.fromEntries(f.formatToParts(d).map((x) => [x.type, x.value]))
  return `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}:${p.second} (${zone})`
}

function title(a: MailAlert): string {
  return a.label?.trim() || kindLabel(a.kind)
}

const STATE_WORDS: Record<AlertState, string> = { open: 'Open', acknowledged: 'Acknowledged', resolved: 'Resolved' }

function facts(a: MailAlert, o: RenderOptions): [string, string][] {
  const rows: [string, string][] = [
    ['Booth', `${a.boothName} (${a.siteName})`],
    ['Watch', title(a)],
    [a.kind === 'sensor_silence' ? 'Silent for' : 'Value', formatAlertValue(a.kind, a.channel, a.value)],
    [a.kind === 'rh_cusum' ? 'Target' : 'Limit', formatAlertValue(a.kind, a.channel, a.limit)],
  ]
  if (a.peak !== null && a.peak !== a.value && a.kind !== 'sensor_silence') rows.push(['Worst so far', formatAlertValue(a.kind, a.channel, a.peak)])
  rows.push(['Since', formatLocalTime(a.openedAt, o.timeZone)])
  rows.push(['Urgency', a.severity === 'critical' ? 'Critical' : 'Warning'])
  if (a.state !== 'open') rows.push(['State now', STATE_WORDS[a.state] + (a.clearedAt ? `, cleared ${formatLocalTime(a.clearedAt, o.timeZone)}` : '')])
  return rows
}

export function renderAlertMail(a: MailAlert, o: RenderOptions, escalation?: Escalation): RenderedMail {
  const link = alertLink(o.publicUrl, a.id)
  const value = formatAlertValue(a.kind, a.channel, a.value)
  const prefix = escalation ? `[Not acknowledged${escalation.count > 1 ? ` ×${escalation.count}` : ''}] ` : a.severity === 'critical' ? '[Critical] ' : ''
  const subject = `${prefix}${a.boothName}: ${title(a)} (${value})`
  const safety = safetyWords(a.kind)
  const intro = escalation
    ? `This alert has not been acknowledged for ${formatSeconds(escalation.unacknowledgedMs / 1000)}.`
    : 'A watch opened a drift alert.'
  const rows = facts(a, o)

  const text = [
    intro,
    '',
    a.message,
    '',
    ...rows.map(([k, v]) => `${k}: ${v}`),
    '',
    ...(safety ? [safety, ''] : []),
    `Open the alert to acknowledge or resolve it: ${link}`,
    '',
    '— Boothbeat',
  ].join('\n')

  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="font-family: system-ui, sans-serif; color: #162326; line-height: 1.5;">
<p>${escapeHtml(intro)}</p>
<p style="font-size: 1.1em;"><strong>${escapeHtml(a.message)}</strong></p>
<table style="border-collapse: collapse;">
${rows.map(([k, v]) => `<tr><th scope="row" style="text-align: left; padding: 2px 12px 2px 0; color: #475a5e;">${escapeHtml(k)}</th><td style="padding: 2px 0;">${escapeHtml(v)}</td></tr>`).join('\n')}
</table>
${safety ? `<p style="border-left: 4px solid #b45309; padding-left: 8px;"><strong>${escapeHtml(safety)}</strong></p>` : ''}
<p><a href="${escapeHtml(link)}">Open the alert</a> to acknowledge or resolve it.</p>
<p style="color: #475a5e;">— Boothbeat</p>
</body></html>`
  return { subject, text, html }
}

export function renderDigestMail(alerts: readonly MailAlert[], o: RenderOptions): RenderedMail {
  const n = alerts.length
  const booths = [...new Set(alerts.map((a) => a.boothName))]
  const subject = `${n} drift alert${n === 1 ? '' : 's'} at once: ${booths.join(', ')}`
  const critical = alerts.some((a) => a.severity === 'critical')
  const listLink = `${o.publicUrl.replace(/\/+$/, '')}/alerts`
  const line = (a: MailAlert) =>
    `${a.boothName}: ${title(a)} — ${formatAlertValue(a.kind, a.channel, a.value)} (limit ${formatAlertValue(a.kind, a.channel, a.limit)}), since ${formatLocalTime(a.openedAt, o.timeZone)}, ${STATE_WORDS[a.state].toLowerCase()}`
  const safety = [...new Set(alerts.map((a) => safetyWords(a.kind)).filter((s): s is string => !!s))]

  const text = [
    `Many alerts opened within a short time; they are listed together here instead of one e-mail each.`,
    '',
    ...alerts.flatMap((a) => [`• ${line(a)}`, `  ${alertLink(o.publicUrl, a.id)}`]),
    '',
    ...(critical || safety.length ? [...safety, ''] : []),
    `All alerts: ${listLink}`,
    '',
    '— Boothbeat',
  ].join('\n')

  const html = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(subject)}</title></head>
<body style="font-family: system-ui, sans-serif; color: #162326; line-height: 1.5;">
<p>Many alerts opened within a short time; they are listed together here instead of one e-mail each.</p>
<ul>
${alerts.map((a) => `<li><a href="${escapeHtml(alertLink(o.publicUrl, a.id))}">${escapeHtml(line(a))}</a></li>`).join('\n')}
</ul>
${safety.map((s) => `<p><strong>${escapeHtml(s)}</strong></p>`).join('\n')}
<p><a href="${escapeHtml(listLink)}">All alerts</a></p>
<p style="color: #475a5e;">— Boothbeat</p>
</body></html>`
  return { subject, text, html }
}
