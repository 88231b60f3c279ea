import { SpecPreviewSchema } from '#shared/schemas/spec'
import { previewForRequest } from '../domain/spec-preview'
import { specHttpError } from '../domain/specs'

// What a revision means at constant conditions: flash, pot life, cure credit, reducer, limits.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  const body = await parseBody(event, SpecPreviewSchema)
  return previewForRequest(useDb(), body).catch(specHttpError)
})
