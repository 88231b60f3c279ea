import { settings } from '../../config'
import { listMailbox, mailboxEnabled } from '../../mail/mailbox'

// What the local SMTP sink received (MAILBOX_DIR), newest first. Admins only; 404 in production unless
// MAILBOX_PAGE=1 (the demo sets it).
export default defineEventHandler(async (event) => {
  const s = settings()
  if (!mailboxEnabled(s)) throw createError({ statusCode: 404, message: 'Page not found' })
  await requireUser(event, ['admin'])
  return { dir: s.MAILBOX_DIR, ...(await listMailbox(s.MAILBOX_DIR)) }
})
