import { listProducts } from '../../domain/specs'

// Every product with its latest revision (number, frozen, data sheet). Any signed-in role.
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  return { products: await listProducts(useDb()) }
})
