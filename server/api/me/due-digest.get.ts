import { eq } from 'drizzle-orm'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const [row] = await useDb().select({ dueDigest: schema.users.dueDigest }).from(schema.users).where(eq(schema.users.id, user.id))
  return { dueDigest: row?.dueDigest ?? false }
})
