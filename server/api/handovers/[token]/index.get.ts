import type { HandoverInfo } from '#shared/utils/custody-schemas'

// Open to anyone holding the link, signed in or not: it shows what accepting would do, before an account exists.
export default defineEventHandler(async (event): Promise<HandoverInfo> => {
  const { handover, pondName, fromName, state } = await findHandover(getRouterParam(event, 'token') ?? '')
  return {
    pondName, fromName, state,
    email: handover.toEmail,
    membersOption: handover.membersOption,
    expiresAt: handover.expiresAt.toISOString(),
    fishCount: state === 'open' ? await pondFishCount(handover.pondId) : 0,
  }
})
