import { LoginSchema } from '#shared/schemas/accounts'
import { authenticate, publicUser } from '../../domain/accounts'

export default defineEventHandler(async (event) => {
  const { email, password } = await parseBody(event, LoginSchema)
  const address = getRequestIP(event) ?? 'unknown'
  await assertNotLimited('loginAccount', email)
  await assertNotLimited('loginAddress', address)

  const user = await authenticate(useDb(), passwordHasher, email, password)
  if (!user) {
    await spendAttempt('loginAddress', address)
    await spendAttempt('loginAccount', email)
    throw createError({ statusCode: 401, message: 'E-mail or password is not right' })
  }
  await clearAttempts('loginAccount', email)
  await replaceUserSession(
    event,
    {
      user: { id: user.id, email: user.email, name: user.name, role: user.role, mustChangePassword: user.must_change_password },
      loggedInAt: Date.now(),
    },
    sessionCookieConfig(event),
  )
  return { user: publicUser(user) }
})
