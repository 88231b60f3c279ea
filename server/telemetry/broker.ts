import { Aedes, type AuthenticateError, type Client } from 'aedes'
import { createServer, type Server } from 'node:net'
import { TokenBucket } from './token-bucket'
import { TOPIC_ROOT } from './wire'

// The embedded MQTT broker (aedes, MQTT 3.1.1) for one shop on one machine. Devices sign in with
// their booth's credentials and may publish and subscribe only under that booth's topics; the app's
// own subscriber signs in with a secret made at start-up. $SYS stays closed to everybody.

export interface DeviceIdentity {
  deviceId: string
  site: string
  booth: string
}

export interface BrokerOptions {
  host: string
  port: number
  app: { username: string; password: string }
  /** Looks a device up and checks its secret; undefined when unknown, revoked or wrong. */
  checkDevice(username: string, password: string): Promise<DeviceIdentity | undefined>
  limits?: { connectsPerMinutePerAddress?: number; messagesPerSecond?: number; messageBurst?: number }
}

type Identity = { kind: 'app' } | ({ kind: 'device' } & DeviceIdentity)

export interface EmbeddedBroker {
  aedes: Aedes
  server: Server
  close(): Promise<void>
  /** Drops every client's connection (fault tests). */
  connectedClients(): number
}

function authError(message: string): AuthenticateError {
  return Object.assign(new Error(message), { returnCode: 4 as const }) as AuthenticateError
}

export async function startEmbeddedBroker(o: BrokerOptions): Promise<EmbeddedBroker> {
  const identities = new WeakMap<Client, Identity>()
  const buckets = new WeakMap<Client, TokenBucket>()
  const connectBuckets = new Map<string, TokenBucket>()
  const perMinute = o.limits?.connectsPerMinutePerAddress ?? 120
  const rate = o.limits?.messagesPerSecond ?? 100
  const burst = o.limits?.messageBurst ?? 5_000

  const ownPrefix = (id: DeviceIdentity) => `${TOPIC_ROOT}/${id.site}/${id.booth}/`

  const aedes = await Aedes.createBroker({
    heartbeatInterval: 60_000,
    preConnect(client, _packet, done) {
      const address = (client.conn as { remoteAddress?: string }).remoteAddress ?? 'unknown'
      let bucket = connectBuckets.get(address)
      if (!bucket) {
        if (connectBuckets.size > 10_000) connectBuckets.clear()
        bucket = new TokenBucket(Math.max(10, perMinute / 4), perMinute / 60)
        connectBuckets.set(address, bucket)
      }
      done(null, bucket.take())
    },
    authenticate(client, username, password, done) {
      const pw = password?.toString('utf8') ?? ''
      if (!username) return done(authError('username required'), false)
      if (username === o.app.username) {
        if (pw === o.app.password) {
          identities.set(client, { kind: 'app' })
          return done(null, true)
        }
        return done(authError('bad credentials'), false)
      }
      o.checkDevice(username, pw).then(
        (id) => {
          if (!id) return done(authError('bad credentials'), false)
          identities.set(client, { kind: 'device', ...id })
          buckets.set(client, new TokenBucket(burst, rate))
          done(null, true)
        },
        () => done(Object.assign(new Error('server unavailable'), { returnCode: 3 as const }) as AuthenticateError, false),
      )
    },
    authorizePublish(client, packet, done) {
      if (!client) return done(null) // the broker's own messages
      const id = identities.get(client)
      if (!id || packet.topic.startsWith('$')) return done(new Error('not allowed'))
      if (id.kind === 'app') return done(null)
      if (!packet.topic.startsWith(ownPrefix(id))) return done(new Error('not your booth'))
      const rest = packet.topic.slice(ownPrefix(id).length)
      if (rest !== 'reading' && rest !== 'mode' && rest !== 'status') return done(new Error('unknown topic'))
      if (!buckets.get(client)?.take()) return done(new Error('message rate exceeded'))
      done(null)
    },
    authorizeSubscribe(client, sub, done) {
      const id = identities.get(client)
      if (!id || sub.topic.startsWith('$') || sub.topic.startsWith('#') || sub.topic.startsWith('+')) return done(null, null)
      if (id.kind === 'app') return done(null, sub)
      // A device may listen only below its own booth (e.g. for future control messages).
      if (!sub.topic.startsWith(ownPrefix(id))) return done(null, null)
      done(null, sub)
    },
  })

  const server = createServer(aedes.handle)
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(o.port, o.host, () => {
      server.off('error', reject)
      resolve()
    })
  })

  return {
    aedes,
    server,
    connectedClients: () => aedes.connectedClients,
    async close() {
      await new Promise<void>((resolve) => aedes.close(() => resolve()))
      await new Promise<void>((resolve) => server.close(() => resolve()))
    },
  }
}
