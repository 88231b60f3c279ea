import { replaceBoothWatches } from '../../alerts/service'
import { PutWatchesSchema } from '../../alerts/watch-set'

// Replaces a booth's whole watch set: { watches: [ { id, kind, …rule fields, recipients: [e-mail] } ] }. Each rule is
// validated with WatchRuleSchema (missing fields get the shop defaults). Managers and admins.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, MANAGERS)
  const boothId = idParam(event, 'boothId')
  const { watches } = await parseBody(event, PutWatchesSchema)
  return replaceBoothWatches(useDb(), user, boothId, watches).catch(asHttpError)
})
