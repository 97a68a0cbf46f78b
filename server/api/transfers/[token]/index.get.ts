import type { FishTransferInfo } from '#shared/utils/custody-schemas'

// Open to anyone holding the link: it names the fish and the sender, and nothing of the fish's record.
export default defineEventHandler(async (event): Promise<FishTransferInfo> => {
  const { transfer, fish, fromPondName, fromName, state } = await findTransfer(getRouterParam(event, 'token') ?? '')
  return {
    fishName: fish.name, species: fish.species, variety: fish.variety, fromPondName, fromName, state,
    email: transfer.toEmail, expiresAt: transfer.expiresAt.toISOString(), reason: transfer.supersededReason,
  }
})
