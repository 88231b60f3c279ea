import { SpecRevisionPatchSchema } from '#shared/schemas/spec'
import { editRevision, specHttpError } from '../../domain/specs'

// Changes to a revision: a draft changes in place (200); a frozen one stays and the changes make the
// product's next revision (201, created: true). Body: any revision fields (null clears), `unit` optional.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const changes = await parseBody(event, SpecRevisionPatchSchema)
  const result = await editRevision(useDb(), user, id, changes).catch(specHttpError)
  if (result.created) setResponseStatus(event, 201)
  return result
})
