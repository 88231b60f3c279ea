import { PinCheckSchema } from '#shared/schemas/jobs'
import { checkPin, pinLimiter } from '../../domain/pairing'
import { toHttpError } from '../../domain/jobs'

// A painter taps their name and enters their PIN on the screen; the screen checks it before it
// offers the actions (each action sends the PIN again). Wrong PINs count per painter (429).
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  if (session.user) throw createError({ statusCode: 403, message: 'Only a paired booth screen can do this' })
  if (!session.screen) throw createError({ statusCode: 401, message: 'This screen is not paired with a booth' })
  const body = await parseBody(event, PinCheckSchema)
  const u = await checkPin(useDb(), { hasher: passwordHasher, limiter: pinLimiter }, body.painterId, body.pin).catch(toHttpError)
  return { painter: { id: u.id, name: u.name, role: u.role } }
})
