import mqtt, { type MqttClient } from 'mqtt'
import { DEVICE_PASSWORD } from './app'

export const topicOf = (booth: string, kind = 'reading') => `boothbeat/v1/larkspur/${booth}/${kind}`

/** Connects as a demo booth's device (or with the credentials given). Rejects on a refused sign-in. */
export function connectDevice(url: string, booth: string, opts: { password?: string; username?: string } = {}): Promise<MqttClient> {
  return new Promise((resolve, reject) => {
    const username = opts.username ?? `larkspur-${booth}`
    const c = mqtt.connect(url, { username, password: opts.password ?? DEVICE_PASSWORD, clientId: `${username}-${Math.random().toString(36).slice(2, 7)}`, reconnectPeriod: 0, connectTimeout: 5_000 })
    c.once('connect', () => resolve(c))
    c.once('error', (e) => {
      c.end(true)
      reject(e)
    })
  })
}

export function reading(tsMs: number, extra: Record<string, unknown> = {}) {
  return JSON.stringify({ ts: new Date(tsMs).toISOString(), airTempC: 21.5, rhPct: 52, panelTempC: 20.8, airflowMps: 0.42, boothDpPa: 6, ...extra })
}

export async function waitUntil<T>(fn: () => Promise<T | undefined | false>, timeoutMs = 15_000, stepMs = 100): Promise<T> {
  const until = Date.now() + timeoutMs
  for (;;) {
    const v = await fn()
    if (v) return v
    if (Date.now() > until) throw new Error('condition not met in time')
    await new Promise((r) => setTimeout(r, stepMs))
  }
}
