import { mkdirSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { SMTPServer } from 'smtp-server'

// The local stand-in for a mail server (DESIGN.md §11: 127.0.0.1:2525): accepts every message without sign-in,
// on loopback only, and keeps each one as an .eml file in `dir` (the app's /admin/mailbox lists them) and in
// memory (for tests). Nothing is relayed anywhere.

export interface SinkMessage {
  /** File name without ".eml"; sortable by arrival. */
  id: string
  /** Full path of the .eml file, or null when the sink keeps messages in memory only. */
  file: string | null
  from: string | null
  to: string[]
  receivedAt: string
  size: number
  /** The message as received (RFC 5322), with the envelope added as X-Sink-Envelope-* headers. */
  raw: string
}

export interface SmtpSinkOptions {
  host?: string
  /** 0 = any free port (see the returned `port`). */
  port?: number
  /** Folder for the .eml files; left out or null = memory only. */
  dir?: string | null
  /** Largest message accepted, bytes (default 10 MB). */
  maxBytes?: number
  /** Messages kept in memory (default 1000, oldest dropped first). */
  keep?: number
}

export interface SmtpSink {
  host: string
  port: number
  dir: string | null
  messages(): SinkMessage[]
  /** Resolves with the first message (already received or arriving later) for which `match` is true. */
  waitFor(match: (m: SinkMessage) => boolean, timeoutMs?: number): Promise<SinkMessage>
  clear(): void
  close(): Promise<void>
}

const LOOPBACK = new Set(['127.0.0.1', '::1', 'localhost'])

function isLoopbackAddress(a: string): boolean {
  return a === '::1' || a.startsWith('127.') || a.startsWith('::ffff:127.')
}

export async function startSmtpSink(opts: SmtpSinkOptions = {}): Promise<SmtpSink> {
  const host = opts.host ?? '127.0.0.1'
  if (!LOOPBACK.has(host)) throw new Error(`The SMTP sink listens on loopback only (127.0.0.1, ::1 or localhost), not on ${host}`)
  const dir = opts.dir ?? null
  if (dir) mkdirSync(dir, { recursive: true })
  const keep = opts.keep ?? 1000
  const store: SinkMessage[] = []
  const waiters = new Set<{ match: (m: SinkMessage) => boolean; done: (m: SinkMessage) => void }>()
  let counter = 0

  const server = new SMTPServer({
    name: 'boothbeat-sink.localhost',
    banner: 'Boothbeat local mail sink: messages are kept here, never relayed',
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: opts.maxBytes ?? 10 * 1024 * 1024,
    logger: false,
    closeTimeout: 1_000,
    onConnect(session, callback) {
      if (!isLoopbackAddress(session.remoteAddress)) return callback(new Error('Only loopback clients may use this sink'))
      callback()
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = []
      stream.on('data', (c: Buffer) => chunks.push(c))
      stream.on('error', (e: Error) => callback(e))
      stream.on('end', () => {
        if (stream.sizeExceeded) return callback(Object.assign(new Error('Message too large'), { responseCode: 552 }))
        const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : null
        const to = session.envelope.rcptTo.map((r) => r.address)
        const envelope = `X-Sink-Envelope-From: <${from ?? ''}>\r\nX-Sink-Envelope-To: ${to.map((t) => `<${t}>`).join(', ')}\r\n`
        const raw = envelope + Buffer.concat(chunks).toString('utf8')
        const now = new Date()
        const id = `${now.toISOString().replace(/[-:.]/g, '').replace('T', '-').replace('Z', '')}-${String(++counter).padStart(4, '0')}-${Math.random().toString(36).slice(2, 8)}`
        let file: string | null = null
        try {
          if (dir) {
            file = join(dir, `${id}.eml`)
            writeFileSync(file, raw)
          }
        } catch (e) {
          return callback(e instanceof Error ? e : new Error(String(e)))
        }
        const msg: SinkMessage = { id, file, from, to, receivedAt: now.toISOString(), size: Buffer.byteLength(raw), raw }
        store.push(msg)
        if (store.length > keep) store.shift()
        for (const w of [...waiters]) {
          if (w.match(msg)) {
            waiters.delete(w)
            w.done(msg)
          }
        }
        callback(null, `Kept as ${id}`)
      })
    },
  })
  server.on('error', (e: Error) => console.warn('[smtp-sink]', e.message))

  const port = await new Promise<number>((resolve, reject) => {
    server.server.once('error', reject)
    server.listen(opts.port ?? 2525, host, () => {
      server.server.off('error', reject)
      const addr = server.server.address()
      resolve(typeof addr === 'object' && addr ? addr.port : (opts.port ?? 0))
    })
  })

  return {
    host,
    port,
    dir,
    messages: () => [...store],
    waitFor(match, timeoutMs = 15_000) {
      const hit = store.find(match)
      if (hit) return Promise.resolve(hit)
      return new Promise((resolve, reject) => {
        const w = {
          match,
          done: (m: SinkMessage) => {
            clearTimeout(timer)
            resolve(m)
          },
        }
        const timer = setTimeout(() => {
          waiters.delete(w)
          reject(new Error(`no matching message within ${timeoutMs} ms (${store.length} received)`))
        }, timeoutMs)
        waiters.add(w)
      })
    },
    clear() {
      store.length = 0
    },
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  }
}
