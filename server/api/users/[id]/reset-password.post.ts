import { ResetPasswordSchema } from '#shared/schemas/accounts'
import { publicUser, resetPassword } from '../../../domain/accounts'

export default defineEventHandler(async (event) => {
  await requireUser(event, ['admin'])
  const id = idParam(event)
  const { password } = await parseBody(event, ResetPasswordSchema)
  const user = await resetPassword(useDb(), passwordHasher, id, password).catch(asHttpError)
  return { user: publicUser(user) }
})
