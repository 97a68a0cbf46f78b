import { and, desc, eq, gt, isNull } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'
import type { FishTransferOffer } from '#shared/utils/custody-schemas'

export default defineEventHandler(async (event): Promise<FishTransferOffer[]> => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId, ['owner'])
  const rows = await useDb().select().from(schema.fishTransfers)
    .where(and(eq(schema.fishTransfers.fishId, fishId), isNull(schema.fishTransfers.acceptedAt), isNull(schema.fishTransfers.withdrawnAt), gt(schema.fishTransfers.expiresAt, new Date())))
    .orderBy(desc(schema.fishTransfers.createdAt))
  const mail = await latestMailStates('transfer', rows.map(r => r.id))
  return rows.map(r => ({ id: r.id, email: r.toEmail, expiresAt: r.expiresAt.toISOString(), createdAt: r.createdAt.toISOString(), mail: mail.get(r.id) ?? null }))
})
