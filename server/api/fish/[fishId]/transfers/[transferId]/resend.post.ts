import { and, eq, gt, isNull } from 'drizzle-orm'
import { formatDate } from '#shared/utils/dates'
import { transferIdParams } from '#shared/utils/custody-schemas'

/** Sends an open fish offer again with a fresh link; the earlier link stops working. */
export default defineEventHandler(async (event) => {
  const { fishId, transferId } = paramsValidated(event, transferIdParams, 'Offer not found')
  const { user, fish } = await requireFishRole(event, fishId, ['owner'])
  const { token, tokenHash } = newLinkToken()
  await useDb().transaction(async (tx) => {
    const [offer] = await tx.update(schema.fishTransfers).set({ tokenHash })
      .where(and(eq(schema.fishTransfers.id, transferId), eq(schema.fishTransfers.fishId, fishId), isNull(schema.fishTransfers.acceptedAt), isNull(schema.fishTransfers.withdrawnAt), isNull(schema.fishTransfers.supersededReason), gt(schema.fishTransfers.expiresAt, new Date())))
      .returning()
    if (!offer) throw createError({ statusCode: 404, statusMessage: 'Offer not found', message: 'No open offer with this id: it may have been accepted, withdrawn or expired.' })
    await queueMail(tx, transferMail({ to: offer.toEmail, fromName: user.name, fishName: fish.name, species: fish.species, expiresOn: formatDate(offer.expiresAt, requestDateStyle(event)), link: `${appOrigin(event)}/transfers/${token}`, transferId }))
    await recordAudit(event, { pondId: fish.pondId, action: 'fish.transfer_resent', details: { transferId, fishId, fishName: fish.name, email: offer.toEmail } }, tx)
  })
  setResponseStatus(event, 202)
  return { ok: true }
})
