import { and, eq, isNull } from 'drizzle-orm'
import { handoverIdParams } from '#shared/utils/custody-schemas'

export default defineEventHandler(async (event) => {
  const { pondId, handoverId } = paramsValidated(event, handoverIdParams, 'Offer not found')
  await requirePondRole(event, pondId, ['owner'])
  await useDb().transaction(async (tx) => {
    const [withdrawn] = await tx.update(schema.pondHandovers).set({ withdrawnAt: new Date() })
      .where(and(eq(schema.pondHandovers.id, handoverId), eq(schema.pondHandovers.pondId, pondId), isNull(schema.pondHandovers.acceptedAt), isNull(schema.pondHandovers.withdrawnAt)))
      .returning()
    if (!withdrawn) throw createError({ statusCode: 404, statusMessage: 'Offer not found', message: 'No open offer with this id: it may have been accepted or withdrawn already.' })
    await recordAudit(event, { pondId, action: 'handover.withdrawn', details: { handoverId, email: withdrawn.toEmail, membersOption: withdrawn.membersOption } }, tx)
  })
  return { ok: true }
})
