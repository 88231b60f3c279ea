import { findBooth } from '../../repositories/booths'

// What this device is: a paired booth screen (and which booth), else 401.
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  if (session.user) throw createError({ statusCode: 403, message: 'Only a paired booth screen can do this' })
  if (!session.screen) throw createError({ statusCode: 401, message: 'This screen is not paired with a booth' })
  const booth = await findBooth(useDb(), session.screen.boothId)
  if (!booth) {
    await clearUserSession(event)
    throw createError({ statusCode: 401, message: 'The booth of this screen no longer exists' })
  }
  return { screen: { boothId: booth.id, boothName: booth.name, pairedAt: new Date(session.screen.pairedAt).toISOString() } }
})
