import { ProductInputSchema } from '#shared/schemas/spec'
import { createProduct, specHttpError } from '../../domain/specs'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const body = await parseBody(event, ProductInputSchema)
  const product = await createProduct(useDb(), user, body).catch(specHttpError)
  setResponseStatus(event, 201)
  return { product }
})
