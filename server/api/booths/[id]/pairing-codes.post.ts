import { issuePairingCode } from '../../../domain/pairing'
import { toHttpError } from '../../../domain/jobs'

// A manager issues a short-lived, single-use pairing code for this booth's screen.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, MANAGERS)
  const id = idParam(event)
  const issued = await issuePairingCode(useDb(), id, user).catch(toHttpError)
  setResponseStatus(event, 201)
  return issued
})
