import { DismissBakeBody } from '#shared/bake/schemas'
import { dismissBake, getBake } from '../../../domain/bakes'

// A detection that was not a bake.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const body = await parseBody(event, DismissBakeBody)
  try {
    await dismissBake(useDb(), user, id, body.reason)
    return await getBake(useDb(), id)
  } catch (e) {
    asHttpError(e)
  }
})
