import { transferAcceptSchema } from '#shared/utils/custody-schemas'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const { transfer, state } = await findTransfer(getRouterParam(event, 'token') ?? '')
  if (state !== 'open') throw closedOfferError(state, 'offer', transfer.supersededReason ?? undefined)
  // The link alone is not enough: it must be opened by the person it was sent to.
  if (transfer.toEmail.toLowerCase() !== user.email.toLowerCase()) {
    throw createError({ statusCode: 403, statusMessage: 'Offer is for another address', message: `This offer was sent to ${transfer.toEmail}. Sign in with that address to accept it.` })
  }
  const target = await readValidated(event, transferAcceptSchema)
  // A pond the caller cannot see is 404, one they only keep or treat fish in is 403.
  if (target.toPondId) await requirePondRole(event, target.toPondId, ['owner'])
  return acceptTransfer(event, transfer, user, target)
})
