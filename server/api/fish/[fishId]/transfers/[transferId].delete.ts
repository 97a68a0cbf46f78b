import { and, eq, isNull } from 'drizzle-orm'
import { transferIdParams } from '#shared/utils/custody-schemas'

export default defineEventHandler(async (event) => {
  const { fishId, transferId } = paramsValidated(event, transferIdParams, 'Offer not found')
  const { fish } = await requireFishRole(event, fishId, ['owner'])
  await useDb().transaction(async (tx) => {
    const [withdrawn] = await tx.update(schema.fishTransfers).set({ withdrawnAt: new Date() })
      .where(and(eq(schema.fishTransfers.id, transferId), eq(schema.fishTransfers.fishId, fishId), isNull(schema.fishTransfers.acceptedAt), isNull(schema.fishTransfers.withdrawnAt)))
      .returning()
    if (!withdrawn) throw createError({ statusCode: 404, statusMessage: 'Offer not found', message: 'No open offer with this id: it may have been accepted or withdrawn already.' })
    await recordAudit(event, { pondId: fish.pondId, action: 'fish.transfer_withdrawn', details: { transferId, fishId, fishName: fish.name, email: withdrawn.toEmail } }, tx)
  })
  return { ok: true }
})
