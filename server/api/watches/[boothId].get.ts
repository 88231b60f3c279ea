import { boothWatches } from '../../alerts/service'

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const boothId = idParam(event, 'boothId')
  return boothWatches(useDb(), boothId).catch(asHttpError)
})
