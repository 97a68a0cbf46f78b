export default defineNuxtPlugin(async () => {
  const session = useSessionStore()
  if (!session.loaded) await session.load()
  // Rendered on the server: the browser still records which account this device now keeps data for.
  else if (import.meta.client) await session.keepOnDevice()
})
