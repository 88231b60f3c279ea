import { ChangePasswordSchema } from '#shared/schemas/accounts'
import { changePassword, publicUser } from '../../domain/accounts'

export default defineEventHandler(async (event) => {
  const me = await requireUser(event, [], { allowPasswordChange: true })
  const body = await parseBody(event, ChangePasswordSchema)
  const user = await changePassword(useDb(), passwordHasher, me.id, body.current, body.next).catch(asHttpError)
  await setUserSession(
    event,
    { user: { id: user.id, email: user.email, name: user.name, role: user.role, mustChangePassword: false } },
    sessionCookieConfig(event),
  )
  return { user: publicUser(user) }
})
