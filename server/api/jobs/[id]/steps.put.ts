import { FinishPlanSchema } from '#shared/schemas/jobs'
import { changeFinishPlan, jobDetail, toHttpError } from '../../../domain/jobs'
import { afterBoothAction } from '../../../domain/booth-screen'

// Replaces the finish plan (ordered steps: product revision and number of coats).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const body = await parseBody(event, FinishPlanSchema)
  await changeFinishPlan(useDb(), user, id, body).catch(toHttpError)
  const detail = await jobDetail(useDb(), id)
  if (detail.job.booth) afterBoothAction(useDb(), detail.job.booth.id)
  return detail
})
