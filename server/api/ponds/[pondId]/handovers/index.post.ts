import { and, eq, isNull, sql } from 'drizzle-orm'
import { HANDOVER_LIFETIME_DAYS, HANDOVER_MEMBERS_WORDS, handoverCreateSchema, type HandoverOffer } from '#shared/utils/custody-schemas'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { formatDate } from '#shared/utils/dates'

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
    await recordAudit(event, { pondId, action: 'handover.offered', details: { handoverId: created!.id, email: input.email, membersOption: input.membersOption } }, tx)
    return created!
  })
  await sendMail({
    to: input.email,
    subject: `${user.name} offers you the pond "${pond!.name}" on Fintrail`,
    text: `Hello,\n\n${user.name} would like to hand the pond "${pond!.name}" over to you on Fintrail: you would become its owner, with its ${fishCount} fish and their whole history.\n\nWhat happens when you accept: ${HANDOVER_MEMBERS_WORDS[input.membersOption].forRecipient(user.name)}\n\nNothing changes until you accept. Open this link to accept; the offer expires on ${formatDate(offer.expiresAt, requestDateStyle(event))} (in ${HANDOVER_LIFETIME_DAYS} days). If you have no account yet, you can create one there with this e-mail address:\n\n${appOrigin(event)}/handovers/${token}\n`,
  })
  setResponseStatus(event, 201)
  return { id: offer.id, email: offer.toEmail, membersOption: offer.membersOption, expiresAt: offer.expiresAt.toISOString(), createdAt: offer.createdAt.toISOString() }
})
