import { screenFeeds } from '../../../domain/booth-screen'
import { toHttpError } from '../../../domain/jobs'
import { findBooth } from '../../../repositories/booths'

// The booth screen's state: staff for any booth, a paired screen for its own booth only.
export default defineEventHandler(async (event) => {
  const id = idParam(event)
  await requireBoothViewer(event, id)
  if (!(await findBooth(useDb(), id))) throw createError({ statusCode: 404, message: 'No such booth' })
  return screenFeeds(useDb()).current(id).catch(toHttpError)
})
