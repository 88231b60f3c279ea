import { z } from 'zod'
import { resolveByHand } from '../../../alerts/service'

// Closes an alert by hand, with a note saying why. Managers, admins and techs.
const Body = z.object({
  note: z
    .string({ error: 'Say why the alert is resolved' })
    .trim()
    .min(1, 'Say why the alert is resolved')
    .max(1000, 'Use at most 1000 characters for the note'),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const { note } = await parseBody(event, Body)
  const alert = await resolveByHand(useDb(), user, id, note).catch(asHttpError)
  return { alert }
})
