import { ResetPasswordSchema } from '#shared/schemas/accounts'
import { publicUser, resetPassword } from '../../../domain/accounts'
import { actorOf } from '../../../domain/event-log'

export default defineEventHandler(async (event) => {
  const admin = await requireUser(event, ['admin'])
  const id = idParam(event)
  const { password } = await parseBody(event, ResetPasswordSchema)
  const user = await resetPassword(useDb(), passwordHasher, id, password, actorOf(admin)).catch(asHttpError)
  return { user: publicUser(user) }
})
