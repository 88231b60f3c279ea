import { EndBakeBody } from '#shared/bake/schemas'
import { endBake, getBake } from '../../../domain/bakes'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const body = await parseBody(event, EndBakeBody)
  try {
    await endBake(useDb(), user, id, body)
    return await getBake(useDb(), id)
  } catch (e) {
    asHttpError(e)
  }
})
