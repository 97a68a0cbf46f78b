import { eq } from 'drizzle-orm'
import { changePasswordSchema } from '#shared/utils/auth-schemas'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const input = await readValidated(event, changePasswordSchema)
  const [row] = await useDb().select({ passwordHash: schema.users.passwordHash }).from(schema.users).where(eq(schema.users.id, user.id))
  if (!row || !(await verifyPassword(row.passwordHash, input.currentPassword))) {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', data: { fieldErrors: { currentPassword: ['The current password is wrong'] } } })
  }
  await useDb().update(schema.users).set({ passwordHash: await hashPassword(input.newPassword), updatedAt: new Date() }).where(eq(schema.users.id, user.id))
  // Every other browser (and any copied cookie) is signed out; this one gets a fresh session.
  await revokeAllSessions(user.id)
  await startSession(event, user)
  return { ok: true }
})
