import { getProduct, specHttpError } from '../../domain/specs'

// A product with all its revisions, newest first.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const id = idParam(event)
  return getProduct(useDb(), id).catch(specHttpError)
})
