import { FilterChangeBody } from '#shared/bake/schemas'
import { recordFilterChange } from '../../domain/maintenance'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const body = await parseBody(event, FilterChangeBody)
  try {
    const r = await recordFilterChange(useDb(), user, body)
    setResponseStatus(event, 201)
    return r
  } catch (e) {
    asHttpError(e)
  }
})
