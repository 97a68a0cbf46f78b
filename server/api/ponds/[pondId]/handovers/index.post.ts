import { and, eq, isNull, sql } from 'drizzle-orm'
import { formatDate } from '#shared/utils/dates'
import { HANDOVER_LIFETIME_DAYS, handoverCreateSchema, type HandoverOffer } from '#shared/utils/custody-schemas'
import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event): Promise<HandoverOffer> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user } = await requirePondRole(event, pondId, ['owner'])
  const input = await readValidated(event, handoverCreateSchema)
  const [alreadyOwner] = await useDb().select({ id: schema.users.id }).from(schema.memberships)
    .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
    .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.role, 'owner'), sql`lower(${schema.users.email}) = ${input.email}`))
  if (alreadyOwner) {
    const message = alreadyOwner.id === user.id ? 'You already own this pond: give the new owner’s address' : 'This person already owns this pond'
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message, data: { fieldErrors: { email: [message] } } })
  }
  const [pond] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  const fishCount = await pondFishCount(pondId)
  const { token, tokenHash } = newLinkToken()
  const offer = await useDb().transaction(async (tx) => {
    // One live link per address: sending again replaces the earlier offer to the same person.
    await tx.update(schema.pondHandovers).set({ withdrawnAt: new Date() }).where(and(
      eq(schema.pondHandovers.pondId, pondId), eq(schema.pondHandovers.toEmail, input.email),
      isNull(schema.pondHandovers.acceptedAt), isNull(schema.pondHandovers.withdrawnAt)))
    const [created] = await tx.insert(schema.pondHandovers).values({
      pondId, fromUserId: user.id, toEmail: input.email, membersOption: input.membersOption, tokenHash,
      expiresAt: new Date(Date.now() + HANDOVER_LIFETIME_DAYS * 86_400_000),
    }).returning()
    await queueMail(tx, handoverMail({ to: input.email, fromName: user.name, pondName: pond!.name, fishCount, membersOption: input.membersOption, expiresOn: formatDate(created!.expiresAt, requestDateStyle(event)), link: `${appOrigin(event)}/handovers/${token}`, handoverId: created!.id }))
    await recordAudit(event, { pondId, action: 'handover.offered', details: { handoverId: created!.id, email: input.email, membersOption: input.membersOption } }, tx)
    return created!
  })
  setResponseStatus(event, 201)
  return { id: offer.id, email: offer.toEmail, membersOption: offer.membersOption, expiresAt: offer.expiresAt.toISOString(), createdAt: offer.createdAt.toISOString(), mail: { status: 'queued', attempts: 0, lastError: null, updatedAt: offer.createdAt.toISOString() } }
})
