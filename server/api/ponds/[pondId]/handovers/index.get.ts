import { and, desc, eq, gt, isNull } from 'drizzle-orm'
import type { HandoverOffer } from '#shared/utils/custody-schemas'
import { pondIdParams } from '#shared/utils/pond-schemas'

/** The offers of this pond still waiting for an answer. */
export default defineEventHandler(async (event): Promise<HandoverOffer[]> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId, ['owner'])
  const rows = await useDb().select().from(schema.pondHandovers)
    .where(and(eq(schema.pondHandovers.pondId, pondId), isNull(schema.pondHandovers.acceptedAt), isNull(schema.pondHandovers.withdrawnAt), gt(schema.pondHandovers.expiresAt, new Date())))
    .orderBy(desc(schema.pondHandovers.createdAt))
  const mail = await latestMailStates('handover', rows.map(r => r.id))
  return rows.map(r => ({ id: r.id, email: r.toEmail, membersOption: r.membersOption, expiresAt: r.expiresAt.toISOString(), createdAt: r.createdAt.toISOString(), mail: mail.get(r.id) ?? null }))
})
