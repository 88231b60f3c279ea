import { z } from 'zod'
import { bakeStateForBooth } from '../../domain/bakes'
import { findBooth } from '../../repositories/booths'

// The bake panel of a booth (screen or staff): running bake, phase, "cure complete at", safety cautions.
const Query = z.object({ boothId: z.coerce.number().int().positive() })

export default defineEventHandler(async (event) => {
  const { boothId } = parseQuery(event, Query)
  await requireBoothViewer(event, boothId)
  if (!(await findBooth(useDb(), boothId))) throw createError({ statusCode: 404, message: 'No such booth' })
  return bakeStateForBooth(useDb(), boothId)
})
