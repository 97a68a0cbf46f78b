import { and, eq, gt, isNull } from 'drizzle-orm'
import { formatDate } from '#shared/utils/dates'
import { handoverIdParams } from '#shared/utils/custody-schemas'

/** Sends an open pond offer again with a fresh link; the earlier link stops working. */
export default defineEventHandler(async (event) => {
  const { pondId, handoverId } = paramsValidated(event, handoverIdParams, 'Offer not found')
  const { user } = await requirePondRole(event, pondId, ['owner'])
  const [pond] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  const fishCount = await pondFishCount(pondId)
  const { token, tokenHash } = newLinkToken()
  await useDb().transaction(async (tx) => {
    const [offer] = await tx.update(schema.pondHandovers).set({ tokenHash })
      .where(and(eq(schema.pondHandovers.id, handoverId), eq(schema.pondHandovers.pondId, pondId), isNull(schema.pondHandovers.acceptedAt), isNull(schema.pondHandovers.withdrawnAt), isNull(schema.pondHandovers.supersededById), gt(schema.pondHandovers.expiresAt, new Date())))
      .returning()
    if (!offer) throw createError({ statusCode: 404, statusMessage: 'Offer not found', message: 'No open offer with this id: it may have been accepted, withdrawn or expired.' })
    await queueMail(tx, handoverMail({ to: offer.toEmail, fromName: user.name, pondName: pond!.name, fishCount, membersOption: offer.membersOption, expiresOn: formatDate(offer.expiresAt, requestDateStyle(event)), link: `${appOrigin(event)}/handovers/${token}`, handoverId }))
    await recordAudit(event, { pondId, action: 'handover.resent', details: { handoverId, email: offer.toEmail, membersOption: offer.membersOption } }, tx)
  })
  setResponseStatus(event, 202)
  return { ok: true }
})
