import { and, eq, isNull } from 'drizzle-orm'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const { invitation, state } = await findInvitation(getRouterParam(event, 'token') ?? '')
  if (state !== 'open') throw createError({ statusCode: 410, statusMessage: `This invitation is ${state}`, message: `This invitation is ${state}: ask the pond owner for a new one.` })
  // The link alone is not enough: it must be opened by the person it was sent to.
  if (invitation.email.toLowerCase() !== user.email.toLowerCase()) {
    throw createError({ statusCode: 403, statusMessage: 'Invitation is for another address', message: `This invitation was sent to ${invitation.email}. Sign in with that address to accept it.` })
  }
  await useDb().transaction(async (tx) => {
    const [taken] = await tx.update(schema.invitations).set({ acceptedAt: new Date(), acceptedById: user.id })
      .where(and(eq(schema.invitations.id, invitation.id), isNull(schema.invitations.acceptedAt))).returning({ id: schema.invitations.id })
    if (!taken) throw createError({ statusCode: 410, statusMessage: 'This invitation is accepted' })
    await tx.insert(schema.memberships).values({ pondId: invitation.pondId, userId: user.id, role: invitation.role })
      .onConflictDoNothing()
    await recordAudit(event, { pondId: invitation.pondId, action: 'invitation.accepted', details: { invitationId: invitation.id, email: invitation.email, role: invitation.role } }, tx)
  })
  return { pondId: invitation.pondId, role: invitation.role }
})
