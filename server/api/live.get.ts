// Every booth's live state as Server-Sent Events (dashboard).
export default defineEventHandler(async (event) => {
  await requireUser(event, STAFF)
  return sendLiveStream(event, null)
})
