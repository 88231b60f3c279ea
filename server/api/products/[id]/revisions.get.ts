import { getRevisions, specHttpError } from '../../../domain/specs'

// The revision history of a product, newest first (frozen ones included, unchanged).
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  return { revisions: await getRevisions(useDb(), id).catch(specHttpError) }
})
