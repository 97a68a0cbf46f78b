/** What is due in the signed-in person's ponds, in the next two weeks or overdue: the shape outside checks read. */
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const items = await dueDetails({ userId: user.id }, serverNow(event))
  return { items: items.map(dueItemOf) }
})
