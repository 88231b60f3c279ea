import { CreateJobSchema } from '#shared/schemas/jobs'
import { createJob, jobDetail, toHttpError } from '../../domain/jobs'
import { afterBoothAction } from '../../domain/booth-screen'

// Managers, admins and techs open repair orders (with a finish plan, or add it later).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const body = await parseBody(event, CreateJobSchema)
  const job = await createJob(useDb(), user, body).catch(toHttpError)
  if (job.booth_id) afterBoothAction(useDb(), job.booth_id)
  setResponseStatus(event, 201)
  return jobDetail(useDb(), job.id)
})
