import { and, desc, eq, gt, isNull } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId, ['owner'])
  return useDb().select({
    id: schema.invitations.id, email: schema.invitations.email, role: schema.invitations.role,
    expiresAt: schema.invitations.expiresAt, createdAt: schema.invitations.createdAt,
  }).from(schema.invitations)
    .where(and(eq(schema.invitations.pondId, pondId), isNull(schema.invitations.acceptedAt), isNull(schema.invitations.withdrawnAt), gt(schema.invitations.expiresAt, new Date())))
    .orderBy(desc(schema.invitations.createdAt))
})
