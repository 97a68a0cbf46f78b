import { and, desc, eq, gt, isNull } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId, ['owner'])
  const rows = await useDb().select({
    id: schema.invitations.id, email: schema.invitations.email, role: schema.invitations.role,
    expiresAt: schema.invitations.expiresAt, createdAt: schema.invitations.createdAt,
  }).from(schema.invitations)
    .where(and(eq(schema.invitations.pondId, pondId), isNull(schema.invitations.acceptedAt), isNull(schema.invitations.withdrawnAt), gt(schema.invitations.expiresAt, new Date())))
    .orderBy(desc(schema.invitations.createdAt))
  const mail = await latestMailStates('invitation', rows.map(r => r.id))
  return rows.map(r => ({ ...r, expiresAt: r.expiresAt.toISOString(), createdAt: r.createdAt.toISOString(), mail: mail.get(r.id) ?? null }))
})
