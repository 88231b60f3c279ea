import { z } from 'zod'
import { rulesOf } from '../../domain/maintenance'

const Query = z.object({ boothId: z.coerce.number().int().positive() })

// The booth's reminder rules (defaults with its overrides).
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const { boothId } = parseQuery(event, Query)
  try {
    return { boothId, rules: await rulesOf(useDb(), boothId) }
  } catch (e) {
    asHttpError(e)
  }
})
