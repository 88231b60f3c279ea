import { CreateUserSchema } from '#shared/schemas/accounts'
import { createAccount, publicUser } from '../../domain/accounts'

export default defineEventHandler(async (event) => {
  await requireUser(event, ['admin'])
  const body = await parseBody(event, CreateUserSchema)
  const user = await createAccount(useDb(), passwordHasher, body, { mustChange: true }).catch(asHttpError)
  setResponseStatus(event, 201)
  return { user: publicUser(user) }
})
