import { sql } from 'drizzle-orm'
import { signInSchema } from '#shared/utils/auth-schemas'

// Compared against when the e-mail is unknown, so both failures take the same time.
let decoyHash: Promise<string> | undefined

export default defineEventHandler(async (event) => {
  const input = await readValidated(event, signInSchema)
  await assertSignInAllowed(event, input.email)
  const [user] = await useDb().select().from(schema.users).where(sql`lower(${schema.users.email}) = ${input.email}`).limit(1)
  decoyHash ??= hashPassword('decoy password that matches nothing')
  const ok = await verifyPassword(user?.passwordHash ?? await decoyHash, input.password)
  if (!user || !ok) {
    await recordSignInFailure(event, input.email)
    throw createError({ statusCode: 401, statusMessage: 'Wrong e-mail or password', message: 'The e-mail or the password is wrong.' })
  }
  await clearSignInFailuresFrom(event, input.email)
  await startSession(event, user)
  return publicUser(user)
})
