export default defineEventHandler(async (event) => {
  // clearUserSession's hook revokes the row, so a copy of this cookie stops working too.
  await clearUserSession(event)
  return { ok: true }
})
