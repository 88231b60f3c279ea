import { UpdateJobSchema } from '#shared/schemas/jobs'
import { changeJob, jobDetail, toHttpError } from '../../domain/jobs'
import { findJob } from '../../repositories/jobs'
import { afterBoothAction } from '../../domain/booth-screen'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const body = await parseBody(event, UpdateJobSchema)
  const before = await findJob(useDb(), id)
  const job = await changeJob(useDb(), user, id, body).catch(toHttpError)
  for (const b of new Set([before?.booth_id, job.booth_id])) if (b) afterBoothAction(useDb(), b, job.status === 'done' || b !== job.booth_id ? null : undefined)
  return jobDetail(useDb(), id)
})
