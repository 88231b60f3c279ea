import nodemailer from 'nodemailer'

// One nodemailer SMTP transport per process, from SMTP_URL (the local sink by default: smtp://127.0.0.1:2525).
// Short timeouts: the outbox worker retries, so a hung server must not hold a send for minutes.

export interface OutgoingMail {
  from: string
  to: string[]
  subject: string
  text: string
  html: string
  /** Our own id, so a message can be matched to its outbox row. */
  headers?: Record<string, string>
}

export interface MailSender {
  send(mail: OutgoingMail): Promise<{ messageId: string }>
  close(): void
}

export function createMailSender(smtpUrl: string): MailSender {
  const transport = nodemailer.createTransport({
    url: smtpUrl,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  })
  return {
    async send(mail) {
      const info = await transport.sendMail({
        from: mail.from,
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        html: mail.html,
        headers: mail.headers,
      })
      return { messageId: String(info.messageId ?? '') }
    },
    close() {
      transport.close()
    },
  }
}
