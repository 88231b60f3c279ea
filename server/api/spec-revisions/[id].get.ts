import { getRevision, specHttpError } from '../../domain/specs'

export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  return getRevision(useDb(), id).catch(specHttpError)
})
