import { FinishCoatSchema } from '#shared/schemas/jobs'
import { finishCoat } from '../../../domain/coats'
import { coatView, toHttpError } from '../../../domain/jobs'
import { assertSessionOrScreen, pinLimiter } from '../../../domain/pairing'
import { afterBoothAction } from '../../../domain/booth-screen'

// Finish the coat being sprayed; its flash-off countdown starts from this moment.
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  try {
    assertSessionOrScreen(session)
  } catch (e) {
    toHttpError(e)
  }
  const id = idParam(event)
  const body = await parseBody(event, FinishCoatSchema)
  const r = await finishCoat(useDb(), { session, hasher: passwordHasher, limiter: pinLimiter }, id, body).catch(toHttpError)
  afterBoothAction(useDb(), r.boothId, r.limits)
  return { coat: coatView(r.coat, new Map()), painter: { id: r.actor.id, name: r.actor.name } }
})
