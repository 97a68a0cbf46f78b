/** The same list as GET /api/due with the words the worklist page shows (fish names, why it is due). */
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return { items: await dueDetails({ userId: user.id }, serverNow(event)), today: serverNow(event).toISOString().slice(0, 10) }
})
