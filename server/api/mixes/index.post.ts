import { LogMixSchema } from '#shared/schemas/jobs'
import { logMix } from '../../domain/mixes'
import { toHttpError } from '../../domain/jobs'
import { assertSessionOrScreen, pinLimiter } from '../../domain/pairing'
import { afterBoothAction } from '../../domain/booth-screen'

// Log a mixed cup (product revision, reducer grade, amount); its pot life counts from mixedAt.
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  try {
    assertSessionOrScreen(session)
  } catch (e) {
    toHttpError(e)
  }
  const body = await parseBody(event, LogMixSchema)
  const r = await logMix(useDb(), { session, hasher: passwordHasher, limiter: pinLimiter }, body).catch(toHttpError)
  afterBoothAction(useDb(), r.boothId)
  setResponseStatus(event, 201)
  return {
    mix: {
      id: r.mix.id,
      boothId: r.mix.booth_id,
      revisionId: r.mix.revision_id,
      reducerGrade: r.mix.reducer_grade,
      reducerAdvised: r.mix.reducer_advised,
      airTempC: r.mix.air_temp_c,
      amountMl: r.mix.amount_ml,
      mixedAt: r.mix.mixed_at.toISOString(),
      warnings: r.mix.warnings,
    },
    painter: { id: r.actor.id, name: r.actor.name },
  }
})
