import { eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  return useDb().select({
    userId: schema.users.id, name: schema.users.name, email: schema.users.email,
    role: schema.memberships.role, readOnly: schema.memberships.readOnly, since: schema.memberships.createdAt,
  }).from(schema.memberships)
    .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
    .where(eq(schema.memberships.pondId, pondId))
    .orderBy(schema.memberships.role, schema.users.name)
})
