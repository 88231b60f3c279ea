import { resolve } from 'node:path'
import { startSmtpSink } from './lib/smtp-sink'

// The local mail sink on its own: npx tsx scripts/smtp-sink.ts [--port 2525] [--dir var/mailbox]
// Loopback only, no sign-in; every message is kept as an .eml file (the app's /admin/mailbox shows them).
function arg(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`)
  return i >= 0 ? process.argv[i + 1] : undefined
}

const port = Number(arg('port') ?? new URL(process.env.SMTP_URL ?? 'smtp://127.0.0.1:2525').port ?? 2525)
const dir = resolve(arg('dir') ?? process.env.MAILBOX_DIR ?? 'var/mailbox')
const sink = await startSmtpSink({ host: '127.0.0.1', port, dir })
console.log(`[smtp-sink] listening on smtp://127.0.0.1:${sink.port}, messages in ${dir} (Ctrl-C to stop)`)

let seen = 0
const timer = setInterval(() => {
  const all = sink.messages()
  for (const m of all.slice(seen)) console.log(`[smtp-sink] ${m.receivedAt} ${m.from ?? '<>'} → ${m.to.join(', ')} (${m.size} bytes) ${m.file ?? ''}`)
  seen = all.length
}, 500)

for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    clearInterval(timer)
    void sink.close().then(() => process.exit(0))
  })
}
