import { eq } from 'drizzle-orm'
import { accountUpdateSchema } from '#shared/utils/auth-schemas'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const input = await readValidated(event, accountUpdateSchema)
  const [updated] = await useDb().update(schema.users).set({ ...input, updatedAt: new Date() }).where(eq(schema.users.id, user.id)).returning()
  return publicUser(updated!)
})
