import { z } from 'zod'
import { upkeepHistory } from '../../../domain/maintenance'

// The booth's upkeep history: bakes, filter changes, calibrations, inspections, notes and services.
const Query = z
  .object({
    from: z.iso.datetime({ offset: true, error: 'from must be an ISO 8601 date-time' }).optional(),
    to: z.iso.datetime({ offset: true, error: 'to must be an ISO 8601 date-time' }).optional(),
    limit: z.coerce.number().int().min(1).max(1000).default(200),
  })
  .refine((q) => !q.from || !q.to || Date.parse(q.from) < Date.parse(q.to), { message: 'from must be before to', path: ['from'] })

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  const q = parseQuery(event, Query)
  try {
    return await upkeepHistory(useDb(), id, { from: q.from ? new Date(q.from) : undefined, to: q.to ? new Date(q.to) : undefined, limit: q.limit })
  } catch (e) {
    asHttpError(e)
  }
})
