// Turns a unique-index violation into the field message the form shows, instead of a 500.
const UNIQUE_FIELDS: Record<string, { field: string, message: string }> = {
  fish_microchip_alive_unique: { field: 'microchip', message: 'A living fish already has this microchip number' },
  // Two sign-ups with one address at once: the second passes the lookup, the index stops it.
  users_email_unique: { field: 'email', message: 'An account with this e-mail exists: sign in or reset the password' },
}

export function conflictFromUniqueViolation(error: unknown) {
  const cause = (error as { cause?: unknown })?.cause ?? error
  const pgError = cause as { code?: string, constraint?: string }
  if (pgError?.code !== '23505' || !pgError.constraint) return null
  const known = UNIQUE_FIELDS[pgError.constraint]
  if (!known) return null
  return createError({ statusCode: 409, statusMessage: 'Already in use', message: known.message, data: { fieldErrors: { [known.field]: [known.message] } } })
}
