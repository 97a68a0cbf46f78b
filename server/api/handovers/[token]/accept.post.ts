import { eq } from 'drizzle-orm'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const { handover, pondName, state } = await findHandover(getRouterParam(event, 'token') ?? '')
  if (state !== 'open') throw closedOfferError(state, 'offer')
  // The link alone is not enough: it must be opened by the person it was sent to.
  if (handover.toEmail.toLowerCase() !== user.email.toLowerCase()) {
    throw createError({ statusCode: 403, statusMessage: 'Offer is for another address', message: `This offer was sent to ${handover.toEmail}. Sign in with that address to accept it.` })
  }
  const accepted = await acceptHandover(event, handover, user)
  const [previous] = await useDb().select({ email: schema.users.email }).from(schema.users).where(eq(schema.users.id, accepted.fromUserId))
  // The change has happened by now; a mail that cannot be sent must not make it look as if it had not.
  await sendMail({
    to: previous!.email,
    subject: `${user.name} accepted the pond "${pondName}" on Fintrail`,
    text: `Hello ${accepted.fromName},\n\n${user.name} accepted your offer: they are now the owner of "${pondName}" and its ${accepted.fishCount} fish.\n`,
  }).catch(error => console.error('[handovers] could not mail the previous owner:', error instanceof Error ? error.message : error))
  return { pondId: accepted.pondId, fishCount: accepted.fishCount }
})
