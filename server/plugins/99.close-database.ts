// Registered last so its close hook runs after the others have flushed what they hold.
export default defineNitroPlugin((nitro) => {
  nitro.hooks.hook('close', async () => {
    await closeDb()
  })
})
