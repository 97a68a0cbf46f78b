import { eq } from 'drizzle-orm'
import { dueSettingsSchema } from '#shared/utils/due'

/** Turns the daily e-mail of what is due on or off. */
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const { dueDigest } = await readValidated(event, dueSettingsSchema)
  await useDb().update(schema.users).set({ dueDigest, updatedAt: new Date() }).where(eq(schema.users.id, user.id))
  return { dueDigest }
})
