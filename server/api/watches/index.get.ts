import { z } from 'zod'
import { allBoothWatches, boothWatches, watchCatalogue } from '../../alerts/service'

// Without boothId: every booth's watch set at a glance, and the catalogue of kinds with the shop defaults.
// With ?boothId=: that booth's watches (as GET /api/watches/:boothId).
const Query = z.object({ boothId: z.coerce.number({ error: 'boothId must be a number' }).int().positive().optional() })

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const { boothId } = parseQuery(event, Query)
  if (boothId !== undefined) return boothWatches(useDb(), boothId).catch(asHttpError)
  return { booths: await allBoothWatches(useDb()), catalogue: watchCatalogue() }
})
