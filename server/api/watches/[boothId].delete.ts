import { resetBoothWatches } from '../../alerts/service'

// Back to the shop defaults. Managers and admins.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, MANAGERS)
  const boothId = idParam(event, 'boothId')
  return resetBoothWatches(useDb(), user, boothId).catch(asHttpError)
})
