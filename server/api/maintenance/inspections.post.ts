import { InspectionBody } from '#shared/bake/schemas'
import { recordInspection } from '../../domain/maintenance'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const body = await parseBody(event, InspectionBody)
  try {
    const r = await recordInspection(useDb(), user, body)
    setResponseStatus(event, 201)
    return r
  } catch (e) {
    asHttpError(e)
  }
})
