export default defineNuxtPlugin(async () => {
  const session = useSessionStore()
  if (!session.loaded) await session.load()
})
