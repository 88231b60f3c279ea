import { CloseMixSchema } from '#shared/schemas/jobs'
import { closeMix } from '../../../domain/mixes'
import { toHttpError } from '../../../domain/jobs'
import { assertSessionOrScreen, pinLimiter } from '../../../domain/pairing'
import { afterBoothAction } from '../../../domain/booth-screen'

// Close a mix: used up, or discarded (e.g. past its pot life).
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  try {
    assertSessionOrScreen(session)
  } catch (e) {
    toHttpError(e)
  }
  const id = idParam(event)
  const body = await parseBody(event, CloseMixSchema)
  const r = await closeMix(useDb(), { session, hasher: passwordHasher, limiter: pinLimiter }, id, body).catch(toHttpError)
  afterBoothAction(useDb(), r.boothId)
  return { mix: { id: r.mix.id, closedAt: r.mix.closed_at?.toISOString() ?? null, outcome: r.mix.close_outcome }, painter: { id: r.actor.id, name: r.actor.name } }
})
