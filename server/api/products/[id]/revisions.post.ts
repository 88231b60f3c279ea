import { SpecRevisionInputSchema } from '#shared/schemas/spec'
import { createRevision, specHttpError } from '../../../domain/specs'

// The next revision of a product. Body: every revision field, SI, or `unit: 'F'` with temperatures in °F.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const fields = await parseBody(event, SpecRevisionInputSchema)
  const revision = await createRevision(useDb(), user, id, fields).catch(specHttpError)
  setResponseStatus(event, 201)
  return { revision }
})
