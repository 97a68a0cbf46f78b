import { and, eq, gt, isNull } from 'drizzle-orm'
import { resetPasswordSchema } from '#shared/utils/auth-schemas'

export default defineEventHandler(async (event) => {
  const input = await readValidated(event, resetPasswordSchema)
  const passwordHash = await hashPassword(input.password)
  const user = await useDb().transaction(async (tx) => {
    // Marking the link used in the same statement that finds it makes a second use fail, even at once.
    const [reset] = await tx.update(schema.passwordResets).set({ usedAt: new Date() })
      .where(and(eq(schema.passwordResets.tokenHash, hashLinkToken(input.token)), isNull(schema.passwordResets.usedAt), gt(schema.passwordResets.expiresAt, new Date())))
      .returning({ userId: schema.passwordResets.userId })
    if (!reset) return null
    const [updated] = await tx.update(schema.users).set({ passwordHash, updatedAt: new Date() }).where(eq(schema.users.id, reset.userId)).returning()
    return updated ?? null
  })
  if (!user) {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'This reset link has been used or has expired: ask for a new one.', data: { fieldErrors: { token: ['This reset link has been used or has expired'] } } })
  }
  await revokeAllSessions(user.id)
  await clearSignInFailures(user.email.toLowerCase())
  await startSession(event, user)
  return publicUser(user)
})
