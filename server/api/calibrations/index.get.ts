import { BoothQuery } from '#shared/bake/schemas'
import { calibrationsOf } from '../../domain/calibration'

// Calibrations, newest first; with ?boothId also the offset in force now per channel.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const { boothId } = parseQuery(event, BoothQuery)
  return calibrationsOf(useDb(), boothId)
})
