// API requests wait for migrations to finish at start-up; health answers at once.
export default defineEventHandler(async (event) => {
  const path = event.path
  if (!path.startsWith('/api/') || path.startsWith('/api/health')) return
  try {
    await databaseReady()
  } catch {
    throw createError({ statusCode: 503, message: 'The database is not ready' })
  }
})
