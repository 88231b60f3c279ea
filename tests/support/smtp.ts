import { simpleParser, type ParsedMail } from 'mailparser'
import { startSmtpSink, type SinkMessage, type SmtpSink, type SmtpSinkOptions } from '../../scripts/lib/smtp-sink'

export { startSmtpSink, type SinkMessage, type SmtpSink }

/** A sink on a free loopback port (or the one given), with its SMTP_URL. */
export async function startTestSink(opts: SmtpSinkOptions = {}): Promise<{ sink: SmtpSink; url: string }> {
  const sink = await startSmtpSink({ host: '127.0.0.1', port: 0, ...opts })
  return { sink, url: `smtp://127.0.0.1:${sink.port}` }
}

export function parseMail(m: SinkMessage): Promise<ParsedMail> {
  return simpleParser(m.raw)
}

/** The plain addresses of a parsed To header. */
export function toAddresses(mail: ParsedMail): string[] {
  const list = Array.isArray(mail.to) ? mail.to : mail.to ? [mail.to] : []
  return list.flatMap((a) => a.value.map((v) => (v.address ?? '').toLowerCase())).sort()
}

/** Every message the sink holds, parsed. */
export async function parsedMessages(sink: SmtpSink): Promise<{ message: SinkMessage; mail: ParsedMail }[]> {
  return Promise.all(sink.messages().map(async (message) => ({ message, mail: await parseMail(message) })))
}
