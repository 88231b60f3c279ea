import { NoteBody } from '#shared/bake/schemas'
import { recordNote } from '../../domain/maintenance'

// A free note, or (kind heater_service) a heater service done.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const body = await parseBody(event, NoteBody)
  try {
    const r = await recordNote(useDb(), user, body)
    setResponseStatus(event, 201)
    return r
  } catch (e) {
    asHttpError(e)
  }
})
