import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import mqtt, { type MqttClient } from 'mqtt'
import { DEVICE_PASSWORD, startTestApp, type TestApp } from '../support/app'
import { startMosquitto, type Mosquitto } from '../support/mosquitto'
import { reading, topicOf, waitUntil } from '../support/mqtt'

// The external broker restarts in the middle of a stream: the app's subscriber reconnects and
// subscribes again, the device's client resends what was not acknowledged and sends what it queued,
// health shows the subscriber down and back, and every reading is stored once.
let broker: Mosquitto
let app: TestApp
beforeAll(async () => {
  broker = await startMosquitto([{ id: 'larkspur-downdraft-1', site: 'larkspur', booth: 'downdraft-1', password: DEVICE_PASSWORD }])
  app = await startTestApp({ MQTT_URL: broker.url, MQTT_USERNAME: broker.appUser.username, MQTT_PASSWORD: broker.appUser.password, MQTT_CLIENT_ID: 'boothbeat-restart-test' })
}, 120_000)
afterAll(async () => {
  await app?.close()
  await broker?.stop()
})

describe('a broker restart during ingestion', () => {
  it('loses nothing and health shows the gap', async () => {
    const device: MqttClient = mqtt.connect(broker.url, { username: 'larkspur-downdraft-1', password: DEVICE_PASSWORD, clientId: 'larkspur-downdraft-1', protocolVersion: 5, reconnectPeriod: 300 })
    await new Promise<void>((r) => device.once('connect', () => r()))
    const t0 = Date.now() - 10 * 60_000
    let n = 0
    const pending: Promise<unknown>[] = []
    const publish = (count: number) => {
      for (let i = 0; i < count; i++) pending.push(device.publishAsync(topicOf('downdraft-1'), reading(t0 + n * 100, { seq: n++ }), { qos: 1 }))
    }
    publish(300)
    await Promise.all(pending.splice(0))
    await broker.kill()
    const down = await waitUntil(async () => {
      const h = await (await fetch(`${app.url}/api/health`)).json()
      return !h.subscriber.up ? h : undefined
    }, 10_000)
    expect(down.status).toBe('degraded')
    publish(300) // queued in the device's client while the broker is away
    await new Promise((r) => setTimeout(r, 1_500))
    await broker.start()
    await Promise.all(pending.splice(0))
    publish(100)
    await Promise.all(pending.splice(0))
    await waitUntil(async () => {
      const r = await app.db.selectFrom('readings').select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
      return Number(r.n) === n
    }, 30_000)
    const up = await waitUntil(async () => {
      const h = await (await fetch(`${app.url}/api/health`)).json()
      return h.subscriber.up && h.status === 'ok' ? h : undefined
    }, 15_000)
    expect(up.ingestion.stored).toBe(n)
    await device.endAsync()
  })
})
