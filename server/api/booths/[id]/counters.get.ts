import { RangeQuery } from '#shared/bake/schemas'
import { boothCounters } from '../../../domain/maintenance'

// Hours in each controller mode (from booth_modes) and bake cycles, over ?from=&to= (default: all time to now).
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  const q = parseQuery(event, RangeQuery)
  try {
    return await boothCounters(useDb(), id, q.from ? new Date(q.from) : null, q.to ? new Date(q.to) : new Date())
  } catch (e) {
    asHttpError(e)
  }
})
