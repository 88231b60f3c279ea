import { CreateUserSchema } from '#shared/schemas/accounts'
import { createAccount, publicUser } from '../../domain/accounts'
import { actorOf } from '../../domain/event-log'

export default defineEventHandler(async (event) => {
  const admin = await requireUser(event, ['admin'])
  const body = await parseBody(event, CreateUserSchema)
  const user = await createAccount(useDb(), passwordHasher, body, { mustChange: true, actor: actorOf(admin) }).catch(asHttpError)
  setResponseStatus(event, 201)
  return { user: publicUser(user) }
})
