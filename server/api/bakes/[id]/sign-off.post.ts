import { SignOffBody } from '#shared/bake/schemas'
import { getBake, signOffBake } from '../../../domain/bakes'

// The tech signs the bake off with notes: its result is frozen (event bake.signed_off).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const body = await parseBody(event, SignOffBody)
  try {
    await signOffBake(useDb(), user, id, body.notes)
    return await getBake(useDb(), id)
  } catch (e) {
    asHttpError(e)
  }
})
