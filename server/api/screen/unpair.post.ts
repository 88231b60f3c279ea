// Forgets the pairing on this device.
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  if (session.screen && !session.user) await clearUserSession(event)
  return { ok: true }
})
