import { jobDetail, toHttpError } from '../../domain/jobs'

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  return jobDetail(useDb(), idParam(event)).catch(toHttpError)
})
