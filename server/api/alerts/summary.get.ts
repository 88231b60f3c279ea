import { alertSummary } from '../../alerts/service'

// Active alerts per booth (open = not yet acknowledged), for the dashboard badges.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  return alertSummary(useDb())
})
