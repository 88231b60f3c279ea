import { describe, expect, it } from 'vitest'
import { alertLink, escapeHtml, formatLocalTime, renderAlertMail, renderDigestMail, type MailAlert } from '../../../server/mail/render'
import { formatAlertValue, severityOf } from '../../../server/alerts/kinds'

const base: MailAlert = {
  id: 42,
  kind: 'rh_band',
  ruleId: 'rh-band',
  label: null,
  severity: 'warning',
  channel: 'rhPct',
  message: 'Humidity out of range: Relative humidity 74.2 %, above the 70.0 % limit for 2 min',
  value: 74.2,
  limit: 70,
  peak: 75.04,
  openedAt: new Date('2026-03-10T21:05:09Z'),
  state: 'open',
  clearedAt: null,
  boothName: 'Downdraft booth 1',
  siteName: 'Larkspur Collision & Refinish',
}
const opts = { publicUrl: 'http://127.0.0.1:3000/', timeZone: 'UTC' }

describe('alert e-mail', () => {
  it('names the booth, the value with its unit, the limit, the time and links to the alert', () => {
    const m = renderAlertMail(base, opts)
    expect(m.subject).toBe('Downdraft booth 1: Humidity out of range (74.2 %)')
    expect(m.text).toContain('Booth: Downdraft booth 1 (Larkspur Collision & Refinish)')
    expect(m.text).toContain('Value: 74.2 %')
    expect(m.text).toContain('Limit: 70.0 %')
    expect(m.text).toContain('Worst so far: 75.0 %')
    expect(m.text).toContain('Since: 2026-03-10 21:05:09 (UTC)')
    expect(m.text).toContain('http://127.0.0.1:3000/alerts/42')
    expect(m.html).toContain('href="http://127.0.0.1:3000/alerts/42"')
    expect(m.html).toContain('74.2 %')
    expect(m.html).toContain('Larkspur Collision &amp; Refinish')
  })

  it('carries the safety words for humidity and condensation alerts', () => {
    const words = 'Hold spraying until the booth is back in spec; follow the data sheet.'
    expect(renderAlertMail(base, opts).text).toContain(words)
    const dew = renderAlertMail({ ...base, kind: 'dew_point_margin', channel: 'dewPointMarginC', value: 1.8, limit: 3, severity: 'critical' }, opts)
    expect(dew.text).toContain('Condensation risk')
    expect(dew.text).toContain(words)
    expect(dew.subject.startsWith('[Critical] ')).toBe(true)
    expect(dew.text).toContain('Value: 1.8 °C')
  })

  it('shows times in the site time zone', () => {
    expect(formatLocalTime(new Date('2026-07-01T12:00:00Z'), 'Europe/Berlin')).toBe('2026-07-01 14:00:00 (Europe/Berlin)')
    expect(formatLocalTime(new Date('2026-07-01T12:00:00Z'), 'No/Such_Zone')).toBe('2026-07-01 12:00:00 (UTC)')
    const m = renderAlertMail(base, { ...opts, timeZone: 'America/Chicago' })
    expect(m.text).toContain('Since: 2026-03-10 16:05:09 (America/Chicago)')
  })

  it('escapes what it puts into HTML', () => {
    const m = renderAlertMail({ ...base, boothName: '<script>alert(1)</script>', label: 'A "quoted" & <b>bold</b> watch' }, opts)
    expect(m.html).not.toContain('<script>alert(1)</script>')
    expect(m.html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;')
    expect(m.html).toContain('A &quot;quoted&quot; &amp; &lt;b&gt;bold&lt;/b&gt; watch')
    expect(m.subject).toContain('A "quoted" & <b>bold</b> watch')
    expect(escapeHtml(`'`)).toBe('&#39;')
  })

  it('says how long a reminder has gone unacknowledged', () => {
    const m = renderAlertMail(base, opts, { count: 2, unacknowledgedMs: 31 * 60_000 })
    expect(m.subject).toBe('[Not acknowledged ×2] Downdraft booth 1: Humidity out of range (74.2 %)')
    expect(m.text).toContain('has not been acknowledged for 31 min')
  })

  it('formats sensor silence as a duration and the CUSUM limit as its target', () => {
    const silent = renderAlertMail({ ...base, kind: 'sensor_silence', channel: 'any', value: 75, limit: 60, peak: 75 }, opts)
    expect(silent.text).toContain('Silent for: 1 min 15 s')
    expect(silent.text).toContain('Limit: 1 min')
    expect(silent.text).toContain('check the sensor')
    const drift = renderAlertMail({ ...base, kind: 'rh_cusum', ruleId: 'rh-drift', value: 58.3, limit: 55 }, opts)
    expect(drift.text).toContain('Target: 55.0 %')
    expect(drift.subject).toContain('Humidity drift')
  })

  it('uses the watch label when there is one, and says when an alert is no longer open', () => {
    const m = renderAlertMail({ ...base, label: 'Basecoat humidity', state: 'resolved', clearedAt: new Date('2026-03-10T21:15:00Z') }, opts)
    expect(m.subject).toContain('Basecoat humidity')
    expect(m.text).toContain('State now: Resolved, cleared 2026-03-10 21:15:00 (UTC)')
  })
})

describe('digest e-mail', () => {
  it('lists every alert with its booth, value and link in one message', () => {
    const list = [base, { ...base, id: 43, boothName: 'Prep deck', kind: 'airflow_min_in_spray', channel: 'airflowMps', value: 0.21, limit: 0.3, severity: 'critical' as const }]
    const m = renderDigestMail(list, opts)
    expect(m.subject).toBe('2 drift alerts at once: Downdraft booth 1, Prep deck')
    expect(m.text).toContain('Downdraft booth 1: Humidity out of range — 74.2 % (limit 70.0 %)')
    expect(m.text).toContain('Prep deck: Low airflow while spraying — 0.21 m/s (limit 0.30 m/s)')
    expect(m.text).toContain('http://127.0.0.1:3000/alerts/42')
    expect(m.text).toContain('http://127.0.0.1:3000/alerts/43')
    expect(m.text).toContain('keep your respirator on')
    expect(m.html).toContain('href="http://127.0.0.1:3000/alerts"')
  })
})

describe('kinds', () => {
  it('marks condensation, airflow and the application window critical, the rest warnings', () => {
    expect(severityOf('dew_point_margin')).toBe('critical')
    expect(severityOf('airflow_min_in_spray')).toBe('critical')
    expect(severityOf('application_window')).toBe('critical')
    expect(severityOf('rh_band')).toBe('warning')
    expect(severityOf('filter_dp_max')).toBe('warning')
  })

  it('formats values with the channel unit and digits', () => {
    expect(formatAlertValue('filter_dp_max', 'intakeFilterDpPa', 262.4)).toBe('262 Pa')
    expect(formatAlertValue('airflow_min_in_spray', 'airflowMps', 0.2)).toBe('0.20 m/s')
    expect(formatAlertValue('rh_band', 'rhPct', null)).toBe('no data')
    expect(alertLink('https://shop.example/', 7)).toBe('https://shop.example/alerts/7')
  })
})
