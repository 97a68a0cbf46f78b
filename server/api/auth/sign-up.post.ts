import { sql } from 'drizzle-orm'
import { signUpSchema } from '#shared/utils/auth-schemas'

export default defineEventHandler(async (event) => {
  const input = await readValidated(event, signUpSchema)
  const existing = await useDb().select({ id: schema.users.id }).from(schema.users)
    .where(sql`lower(${schema.users.email}) = ${input.email}`).limit(1)
  if (existing.length) {
    throw createError({ statusCode: 409, statusMessage: 'E-mail already registered', data: { fieldErrors: { email: ['An account with this e-mail exists: sign in or reset the password'] } } })
  }
  const passwordHash = await hashPassword(input.password)
  const [user] = await useDb().insert(schema.users)
    .values({ name: input.name, email: input.email, passwordHash, decimalMark: input.decimalMark ?? 'point' })
    .returning()
    .catch((error) => {
      throw conflictFromUniqueViolation(error) ?? error
    })
  await startSession(event, user!)
  setResponseStatus(event, 201)
  return publicUser(user!)
})
