export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const { handover, state } = await findHandover(getRouterParam(event, 'token') ?? '')
  if (state !== 'open') throw closedOfferError(state, 'offer')
  // The link alone is not enough: it must be opened by the person it was sent to.
  if (handover.toEmail.toLowerCase() !== user.email.toLowerCase()) {
    throw createError({ statusCode: 403, statusMessage: 'Offer is for another address', message: `This offer was sent to ${handover.toEmail}. Sign in with that address to accept it.` })
  }
  // The previous owner's mail is queued in the same transaction as the change of hands.
  const accepted = await acceptHandover(event, handover, user)
  return { pondId: accepted.pondId, fishCount: accepted.fishCount }
})
