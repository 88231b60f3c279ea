import { UpdateUserSchema } from '#shared/schemas/accounts'
import { publicUser } from '../../domain/accounts'
import { updateUser } from '../../repositories/users'

export default defineEventHandler(async (event) => {
  const admin = await requireUser(event, ['admin'])
  const id = idParam(event)
  const body = await parseBody(event, UpdateUserSchema)
  if (id === admin.id && (body.disabled || (body.role && body.role !== 'admin'))) {
    throw createError({ statusCode: 400, message: 'You cannot disable yourself or remove your own admin role' })
  }
  const user = await updateUser(useDb(), id, body)
  if (!user) throw createError({ statusCode: 404, message: 'No such account' })
  return { user: publicUser(user) }
})
