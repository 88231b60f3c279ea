import { StartCoatSchema } from '#shared/schemas/jobs'
import { startCoat } from '../../domain/coats'
import { coatView, toHttpError } from '../../domain/jobs'
import { assertSessionOrScreen, pinLimiter } from '../../domain/pairing'
import { afterBoothAction } from '../../domain/booth-screen'

// Start the next coat of a job: a signed-in painter (tech, manager, admin) as themselves, or a paired
// booth screen with the painter's PIN. Going past a guard rail needs `reason` (400 without one).
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  try {
    assertSessionOrScreen(session)
  } catch (e) {
    toHttpError(e)
  }
  const body = await parseBody(event, StartCoatSchema)
  const r = await startCoat(useDb(), { session, hasher: passwordHasher, limiter: pinLimiter }, body).catch(toHttpError)
  afterBoothAction(useDb(), r.boothId, r.limits)
  setResponseStatus(event, 201)
  return { coat: coatView(r.coat, new Map()), painter: { id: r.actor.id, name: r.actor.name }, warnings: r.warnings }
})
