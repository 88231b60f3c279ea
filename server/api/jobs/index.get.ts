import { JobListQuerySchema } from '#shared/schemas/jobs'
import { jobList } from '../../domain/jobs'

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const q = parseQuery(event, JobListQuerySchema)
  return { jobs: await jobList(useDb(), { status: q.status === 'all' ? undefined : q.status, boothId: q.boothId }) }
})
