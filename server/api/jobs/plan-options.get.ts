import { planOptions } from '../../domain/jobs'

// Product revisions, painters and booths the job forms choose from.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  return planOptions(useDb())
})
