import { findBooth } from '../../../repositories/booths'

export default defineEventHandler(async (event) => {
  const id = idParam(event)
  await requireBoothViewer(event, id)
  if (!(await findBooth(useDb(), id))) throw createError({ statusCode: 404, message: 'No such booth' })
  return sendLiveStream(event, id)
})
