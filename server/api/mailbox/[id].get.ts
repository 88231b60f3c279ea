import { getRouterParam } from 'h3'
import { settings } from '../../config'
import { mailboxEnabled, readMailboxMessage } from '../../mail/mailbox'

// One message of the local sink, parsed (text and HTML parts). Same gate as the list.
export default defineEventHandler(async (event) => {
  const s = settings()
  if (!mailboxEnabled(s)) throw createError({ statusCode: 404, message: 'Page not found' })
  await requireUser(event, ['admin'])
  const message = await readMailboxMessage(s.MAILBOX_DIR, getRouterParam(event, 'id') ?? '')
  if (!message) throw createError({ statusCode: 404, message: 'No such message' })
  return { message }
})
