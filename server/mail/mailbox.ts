import { readdir, readFile, stat } from 'node:fs/promises'
import { join, resolve } from 'node:path'
import { simpleParser, type AddressObject } from 'mailparser'

// Reads what the local SMTP sink (scripts/lib/smtp-sink.ts) stored in MAILBOX_DIR, for the admin mailbox page.
// A development and demo aid: off in production unless MAILBOX_PAGE=1.

export function mailboxEnabled(s: { NODE_ENV: string; MAILBOX_PAGE?: string }): boolean {
  return s.NODE_ENV !== 'production' || s.MAILBOX_PAGE === '1'
}

export interface MailboxEntry {
  id: string
  subject: string
  from: string
  to: string[]
  date: string | null
  receivedAt: string
  size: number
}

export interface MailboxMessage extends MailboxEntry {
  text: string
  html: string | null
  headers: Record<string, string>
}

const ID = /^[A-Za-z0-9][A-Za-z0-9._-]{0,200}$/

export function isMailboxId(id: string): boolean {
  return ID.test(id) && !id.includes('..')
}

function addresses(v: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(v) ? v : v ? [v] : []
  return list.flatMap((a) => a.value.map((x) => (x.address ? (x.name ? `${x.name} <${x.address}>` : x.address) : x.name)))
}

async function parse(dir: string, id: string): Promise<MailboxMessage | null> {
  const file = join(dir, `${id}.eml`)
  let raw: Buffer
  let mtime: Date
  try {
    ;[raw, mtime] = await Promise.all([readFile(file), stat(file).then((s) => s.mtime)])
  } catch {
    return null
  }
  const mail = await simpleParser(raw)
  const headers: Record<string, string> = {}
  for (const line of mail.headerLines ?? []) {
    const key = line.key.toLowerCase()
    if (key.startsWith('x-') || ['message-id', 'date', 'mime-version'].includes(key)) {
      headers[key] = line.line.slice(line.line.indexOf(':') + 1).trim()
    }
  }
  return {
    id,
    subject: mail.subject ?? '(no subject)',
    from: addresses(mail.from).join(', '),
    to: addresses(mail.to),
    date: mail.date ? mail.date.toISOString() : null,
    receivedAt: mtime.toISOString(),
    size: raw.length,
    text: mail.text ?? '',
    html: typeof mail.html === 'string' ? mail.html : null,
    headers,
  }
}

/** Newest first. A folder that does not exist yet is an empty mailbox. */
export async function listMailbox(dir: string, limit = 200): Promise<{ messages: MailboxEntry[]; total: number }> {
  const folder = resolve(dir)
  let names: string[]
  try {
    names = (await readdir(folder)).filter((n) => n.endsWith('.eml'))
  } catch {
    return { messages: [], total: 0 }
  }
  const ids = names
    .map((n) => n.slice(0, -4))
    .filter(isMailboxId)
    .sort()
    .reverse()
  const messages: MailboxEntry[] = []
  for (const id of ids.slice(0, limit)) {
    const m = await parse(folder, id).catch(() => null)
    if (m) messages.push({ id: m.id, subject: m.subject, from: m.from, to: m.to, date: m.date, receivedAt: m.receivedAt, size: m.size })
  }
  return { messages, total: ids.length }
}

export async function readMailboxMessage(dir: string, id: string): Promise<MailboxMessage | null> {
  if (!isMailboxId(id)) return null
  return parse(resolve(dir), id).catch(() => null)
}
