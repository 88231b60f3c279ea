import { z } from 'zod'
import { acknowledge } from '../../../alerts/service'

// "I have seen it and I am on it": stops reminders. Managers, admins and techs.
const Body = z.object({
  note: z.string({ error: 'note must be text' }).trim().max(1000, 'Use at most 1000 characters for the note').optional(),
})

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const { note } = await parseBody(event, Body)
  const alert = await acknowledge(useDb(), user, id, note ? note : null).catch(asHttpError)
  return { alert }
})
