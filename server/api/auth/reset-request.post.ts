import { sql } from 'drizzle-orm'
import { resetRequestSchema } from '#shared/utils/auth-schemas'

// Counted from the row's own created_at (the transaction's clock), so the link lasts exactly one hour.
const RESET_LIFETIME = sql`now() + interval '1 hour'`

/**
 * Both branches do the same work (one lookup, one transaction, one mail in the outbox) and give
 * the same answer, so neither the status nor the time tells whether the address has an account.
 * An unknown address is told so by mail: its owner learns that no account uses it.
 */
export default defineEventHandler(async (event) => {
  const { email } = await readValidated(event, resetRequestSchema)
  const [user] = await useDb().select().from(schema.users).where(sql`lower(${schema.users.email}) = ${email}`).limit(1)
  const origin = appOrigin(event)
  await useDb().transaction(async (tx) => {
    if (user) {
      const { token, tokenHash } = newLinkToken()
      const [reset] = await tx.insert(schema.passwordResets).values({ userId: user.id, tokenHash, expiresAt: RESET_LIFETIME }).returning({ id: schema.passwordResets.id })
      await queueMail(tx, {
        to: user.email, kind: 'password-reset', subjectType: 'password-reset', subjectId: reset!.id,
        subject: 'Reset your Fintrail password',
        text: `Hello ${user.name},\n\nTo choose a new password, open this link within one hour:\n\n${origin}/reset-password?token=${token}\n\nThe link works once. If you did not ask for it, ignore this e-mail: your password stays as it is.\n`,
      })
    }
    else {
      await queueMail(tx, {
        to: email, kind: 'password-reset-no-account',
        subject: 'Fintrail password reset',
        text: `Hello,\n\nSomeone asked to reset the Fintrail password of this e-mail address, but no Fintrail account uses it. If it was you, you may have signed up with another address, or you can create an account at ${origin}/sign-up.\n\nIf you did not ask, ignore this e-mail.\n`,
      })
    }
  })
  return { ok: true, message: 'If an account uses this e-mail, a reset link is on its way.' }
})
