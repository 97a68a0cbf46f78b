import { sql } from 'drizzle-orm'
import { resetRequestSchema } from '#shared/utils/auth-schemas'

const RESET_LIFETIME_MS = 60 * 60 * 1000

export default defineEventHandler(async (event) => {
  const { email } = await readValidated(event, resetRequestSchema)
  const [user] = await useDb().select().from(schema.users).where(sql`lower(${schema.users.email}) = ${email}`).limit(1)
  if (user) {
    const { token, tokenHash } = newLinkToken()
    await useDb().insert(schema.passwordResets).values({ userId: user.id, tokenHash, expiresAt: new Date(Date.now() + RESET_LIFETIME_MS) })
    const link = `${appOrigin(event)}/reset-password?token=${token}`
    await sendMail({
      to: user.email,
      subject: 'Reset your Fintrail password',
      text: `Hello ${user.name},\n\nTo choose a new password, open this link within one hour:\n\n${link}\n\nThe link works once. If you did not ask for it, ignore this e-mail: your password stays as it is.\n`,
    })
  }
  // The same answer whether or not the address has an account.
  return { ok: true, message: 'If an account uses this e-mail, a reset link is on its way.' }
})
