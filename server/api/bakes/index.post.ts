import { StartBakeBody } from '#shared/bake/schemas'
import { getBake, startBake } from '../../domain/bakes'

// A tech starts a bake by hand.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const body = await parseBody(event, StartBakeBody)
  try {
    const bake = await startBake(useDb(), user, body)
    setResponseStatus(event, 201)
    return getBake(useDb(), bake.id)
  } catch (e) {
    asHttpError(e)
  }
})
