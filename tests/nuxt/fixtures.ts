import type { Booth, LiveReading } from '~/stores/booths'
import type { AccountUser } from '~/stores/session'

export function reading(over: Partial<LiveReading> = {}, ageMs = 2_000): LiveReading {
  const at = new Date(Date.now() - ageMs).toISOString()
  return {
    boothId: 1,
    ts: at,
    receivedAt: at,
    airTempC: 21.4,
    rhPct: 54,
    panelTempC: 20.8,
    airflowMps: 0.41,
    boothDpPa: 6.5,
    intakeFilterDpPa: 95,
    exhaustFilterDpPa: 140,
    heaterOn: false,
    dewPointC: 11.8,
    dewPointMarginC: 9,
    ...over,
  }
}

export function booth(over: Partial<Booth> = {}): Booth {
  return {
    id: 1,
    slug: 'booth-1',
    name: 'Booth 1',
    kind: 'downdraft',
    hasHeater: true,
    site: { id: 1, slug: 'larkspur', name: 'Larkspur Collision & Refinish' },
    topic: 'boothbeat/v1/larkspur/booth-1/reading',
    deviceId: 'dev-1',
    mode: 'spray',
    modeSince: new Date(Date.now() - 12 * 60_000).toISOString(),
    deviceStatus: 'online',
    latest: reading(),
    stale: false,
    ...over,
  }
}

export function user(over: Partial<AccountUser> = {}): AccountUser {
  return {
    id: 1,
    email: 'manager@larkspur.example',
    name: 'Mara Test',
    role: 'manager',
    mustChangePassword: false,
    disabled: false,
    hasPin: false,
    prefs: {},
    ...over,
  }
}
