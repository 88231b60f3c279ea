import { UpdateUserSchema } from '#shared/schemas/accounts'
import { changeAccount, publicUser } from '../../domain/accounts'
import { actorOf } from '../../domain/event-log'

export default defineEventHandler(async (event) => {
  const admin = await requireUser(event, ['admin'])
  const id = idParam(event)
  const body = await parseBody(event, UpdateUserSchema)
  if (id === admin.id && (body.disabled || (body.role && body.role !== 'admin'))) {
    throw createError({ statusCode: 400, message: 'You cannot disable yourself or remove your own admin role' })
  }
  const user = await changeAccount(useDb(), id, body, actorOf(admin)).catch(asHttpError)
  return { user: publicUser(user) }
})
