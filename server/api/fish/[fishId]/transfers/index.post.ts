import { and, eq, isNull } from 'drizzle-orm'
import { formatDate } from '#shared/utils/dates'
import { fishIdParams } from '#shared/utils/fish-schemas'
import { fishTransferCreateSchema, HANDOVER_LIFETIME_DAYS, type FishTransferOffer } from '#shared/utils/custody-schemas'

/** Offers a fish to another owner by e-mail; they accept it into one of their ponds. */
export default defineEventHandler(async (event): Promise<FishTransferOffer> => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { user, fish } = await requireFishRole(event, fishId, ['owner'])
  const input = await readValidated(event, fishTransferCreateSchema)
  if (input.email === user.email.toLowerCase()) {
    const message = 'To move a fish between your own ponds, use Move instead'
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message, data: { fieldErrors: { email: [message] } } })
  }
  if (fish.status !== 'alive') throw createError({ statusCode: 409, statusMessage: 'Not a living fish', message: `${fish.name} is recorded as ${fish.status}: only a living fish can be rehomed.` })
  const { token, tokenHash } = newLinkToken()
  const offer = await useDb().transaction(async (tx) => {
    const companions = await companionsLeftBehind(tx, fish)
    if (companions.length && !input.confirmSeparation) throw separationNeedsConfirmation(fish.name, companions)
    // One live link per address: sending again replaces the earlier offer to the same person.
    await tx.update(schema.fishTransfers).set({ withdrawnAt: new Date() }).where(and(
      eq(schema.fishTransfers.fishId, fishId), eq(schema.fishTransfers.toEmail, input.email),
      isNull(schema.fishTransfers.acceptedAt), isNull(schema.fishTransfers.withdrawnAt)))
    const [created] = await tx.insert(schema.fishTransfers).values({
      fishId, fromPondId: fish.pondId, fromUserId: user.id, toEmail: input.email, tokenHash,
      confirmedSeparation: companions.length > 0, expiresAt: new Date(Date.now() + HANDOVER_LIFETIME_DAYS * 86_400_000),
    }).returning()
    await queueMail(tx, transferMail({ to: input.email, fromName: user.name, fishName: fish.name, species: fish.species, expiresOn: formatDate(created!.expiresAt, requestDateStyle(event)), link: `${appOrigin(event)}/transfers/${token}`, transferId: created!.id }))
    await recordAudit(event, { pondId: fish.pondId, action: 'fish.transfer_offered', details: { transferId: created!.id, fishId, fishName: fish.name, email: input.email, separatedFrom: companions } }, tx)
    return created!
  })
  setResponseStatus(event, 201)
  return { id: offer.id, email: offer.toEmail, expiresAt: offer.expiresAt.toISOString(), createdAt: offer.createdAt.toISOString(), mail: { status: 'queued', attempts: 0, lastError: null, updatedAt: offer.createdAt.toISOString() } }
})
