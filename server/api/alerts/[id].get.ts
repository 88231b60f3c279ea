import { alertDetail } from '../../alerts/service'

// One alert with the e-mails sent about it.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  return alertDetail(useDb(), id).catch(asHttpError)
})
