import { ProductPatchSchema } from '#shared/schemas/spec'
import { specHttpError, updateProduct } from '../../domain/specs'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const id = idParam(event)
  const body = await parseBody(event, ProductPatchSchema)
  return { product: await updateProduct(useDb(), user, id, body).catch(specHttpError) }
})
