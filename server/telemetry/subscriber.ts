import mqtt, { type IClientOptions, type MqttClient } from 'mqtt'
import { TOPIC_ROOT } from './wire'

// The app's MQTT client: QoS 1, a persistent session under a stable client id, automatic reconnect.
// With a shared group (external MQTT 5 broker), the storage subscription is `$share/<group>/…` so
// instances split the stream, and a second plain client feeds the live screens with every reading.

export interface SubscriberOptions {
  url: string
  username?: string
  password?: string
  clientId: string
  protocolVersion: 4 | 5
  sharedGroup?: string
  /**
   * QoS of the storage subscription: 1 against an external broker (it keeps our session while we
   * restart). Against the embedded broker, which lives and dies with this process, the device's
   * QoS 1 PUBACK already means "held in this process's memory"; a second QoS 1 hop over loopback to
   * ourselves adds no durability and halves ingest throughput, so 0 is used there.
   */
  storageQos: 0 | 1
  onReading(topic: string, payload: Buffer, route: { store: boolean; live: boolean }): void
  onControl(topic: string, payload: Buffer): void
  onState(up: boolean, detail?: string): void
}

export interface Subscriber {
  clients: MqttClient[]
  close(): Promise<void>
}

const READINGS = `${TOPIC_ROOT}/+/+/reading`
const MODES = `${TOPIC_ROOT}/+/+/mode`
const STATUS = `${TOPIC_ROOT}/+/+/status`

function options(o: SubscriberOptions, clientId: string, persistent: boolean): IClientOptions {
  return {
    clientId,
    username: o.username,
    password: o.password,
    protocolVersion: o.protocolVersion,
    clean: !persistent,
    reconnectPeriod: 1_000,
    connectTimeout: 10_000,
    keepalive: 30,
    resubscribe: true,
    ...(o.protocolVersion === 5 && persistent ? { properties: { sessionExpiryInterval: 3_600 } } : {}),
  }
}

function connect(o: SubscriberOptions, clientId: string, persistent: boolean, topics: Record<string, { qos: 0 | 1 }>, label: string) {
  const client = mqtt.connect(o.url, options(o, clientId, persistent))
  client.on('connect', (ack) => {
    o.onState(true)
    // With a resumed session the broker still holds our subscriptions; subscribing again is harmless.
    if (!ack.sessionPresent || !persistent) {
      client.subscribe(topics, (err) => {
        if (err) o.onState(false, `${label} subscribe failed: ${err.message}`)
      })
    }
  })
  client.on('close', () => o.onState(false, `${label} disconnected`))
  client.on('error', (err) => o.onState(false, `${label}: ${err.message}`))
  return client
}

export function startSubscriber(o: SubscriberOptions): Subscriber {
  const clients: MqttClient[] = []
  const storageTopic = o.sharedGroup ? `$share/${o.sharedGroup}/${READINGS}` : READINGS
  const main = connect(o, o.clientId, true, { [storageTopic]: { qos: o.storageQos }, [MODES]: { qos: 1 }, [STATUS]: { qos: 1 } }, 'subscriber')
  main.on('message', (topic, payload) => {
    if (topic.endsWith('/reading')) o.onReading(topic, payload, { store: true, live: !o.sharedGroup })
    else o.onControl(topic, payload)
  })
  clients.push(main)
  if (o.sharedGroup) {
    // Live only: no persistence needed, a missed reading is replaced by the next one.
    const live = connect(o, `${o.clientId}-live`, false, { [READINGS]: { qos: 0 } }, 'live subscriber')
    live.on('message', (topic, payload) => o.onReading(topic, payload, { store: false, live: true }))
    clients.push(live)
  }
  return {
    clients,
    async close() {
      await Promise.all(clients.map((c) => c.endAsync()))
    },
  }
}
