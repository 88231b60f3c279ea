import { PinSchema } from '#shared/schemas/accounts'
import { ACTOR_ROLES, setPin } from '../../domain/pairing'
import { toHttpError } from '../../domain/jobs'

// Sets the PIN a painter enters on booth screens (4–6 digits, stored as a scrypt hash).
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, ACTOR_ROLES)
  const { pin } = await parseBody(event, PinSchema)
  await setPin(useDb(), passwordHasher, user, pin).catch(toHttpError)
  return { ok: true, hasPin: true }
})
