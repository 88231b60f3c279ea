import { z } from 'zod'
import { boothHistory, MAX_RANGE_DAYS } from '../../../domain/history'
import { findBooth } from '../../../repositories/booths'

const Query = z
  .object({
    from: z.iso.datetime({ offset: true, error: 'from must be an ISO 8601 date-time' }).optional(),
    to: z.iso.datetime({ offset: true, error: 'to must be an ISO 8601 date-time' }).optional(),
  })
  .transform((q) => {
    const to = q.to ? new Date(q.to) : new Date()
    const from = q.from ? new Date(q.from) : new Date(to.getTime() - 3_600_000)
    return { from, to }
  })
  .refine((q) => q.from < q.to, { message: 'from must be before to', path: ['from'] })
  .refine((q) => q.to.getTime() - q.from.getTime() <= MAX_RANGE_DAYS * 86_400_000, {
    message: `a range of at most ${MAX_RANGE_DAYS} days`,
    path: ['to'],
  })

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  const { from, to } = parseQuery(event, Query)
  if (!(await findBooth(useDb(), id))) throw createError({ statusCode: 404, message: 'No such booth' })
  return boothHistory(useDb(), id, from, to)
})
