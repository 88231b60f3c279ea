import { freezeRevisionBy, specHttpError } from '../../../domain/specs'

// Freezes a revision on request (coats and mixes freeze theirs on first use). Idempotent.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  return freezeRevisionBy(useDb(), user, id).catch(specHttpError)
})
