import { ConfirmBakeBody } from '#shared/bake/schemas'
import { confirmBake, getBake } from '../../../domain/bakes'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const body = await parseBody(event, ConfirmBakeBody)
  try {
    await confirmBake(useDb(), user, id, body)
    return await getBake(useDb(), id)
  } catch (e) {
    asHttpError(e)
  }
})
