import { getBake } from '../../domain/bakes'

// One bake with its products, phases, verdicts, the live "cure complete at" estimate and the safety cautions.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  try {
    return await getBake(useDb(), id)
  } catch (e) {
    asHttpError(e)
  }
})
