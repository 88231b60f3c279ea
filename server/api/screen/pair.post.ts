import { PairScreenSchema } from '#shared/schemas/jobs'
import { pairScreen } from '../../domain/pairing'
import { toHttpError } from '../../domain/jobs'

// A booth screen enters a pairing code and gets a session limited to that booth (no user).
// Wrong codes count per address, like sign-in attempts.
export default defineEventHandler(async (event) => {
  const { code } = await parseBody(event, PairScreenSchema)
  const key = `pair:${getRequestIP(event) ?? 'unknown'}`
  await assertNotLimited('loginAddress', key)
  let paired: Awaited<ReturnType<typeof pairScreen>>
  try {
    paired = await pairScreen(useDb(), code)
  } catch (e) {
    if ((e as { statusCode?: number }).statusCode === 400) await spendAttempt('loginAddress', key)
    return toHttpError(e)
  }
  await replaceUserSession(event, { screen: { boothId: paired.boothId, pairedAt: Date.now() } }, sessionCookieConfig(event))
  return { screen: { boothId: paired.boothId, boothName: paired.boothName } }
})
