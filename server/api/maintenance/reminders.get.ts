import { BoothQuery } from '#shared/bake/schemas'
import { reminders } from '../../domain/maintenance'

// Upkeep reminders (date, booth hours, bake cycles, filter pressure-drop limit and trend, calibrations due).
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const { boothId } = parseQuery(event, BoothQuery)
  try {
    return await reminders(useDb(), boothId)
  } catch (e) {
    asHttpError(e)
  }
})
