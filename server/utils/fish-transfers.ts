import type { H3Event } from 'h3'
import { eq } from 'drizzle-orm'
import type { CurrentUser } from '#shared/types'

export async function findTransfer(token: string) {
  const [row] = await useDb().select({ transfer: schema.fishTransfers, fish: schema.fish, fromPondName: schema.ponds.name, fromName: schema.users.name })
    .from(schema.fishTransfers)
    .innerJoin(schema.fish, eq(schema.fish.id, schema.fishTransfers.fishId))
    .innerJoin(schema.ponds, eq(schema.ponds.id, schema.fishTransfers.fromPondId))
    .innerJoin(schema.users, eq(schema.users.id, schema.fishTransfers.fromUserId))
    .where(eq(schema.fishTransfers.tokenHash, hashLinkToken(token)))
    .limit(1)
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Offer not found' })
  return { ...row, state: offerState(row.transfer, Boolean(row.transfer.supersededReason)) }
}

type TransferRow = typeof schema.fishTransfers.$inferSelect

/**
 * One transaction on both locked ponds and the fish: the offer must still be open, the fish still in
 * the pond it was offered from, and the sender still its owner; of two acceptances at once one wins.
 */
export async function acceptTransfer(event: H3Event, found: TransferRow, user: CurrentUser, target: { toPondId?: string, newPondName?: string }) {
  return useDb().transaction(async (tx) => {
    let toPondId = target.toPondId
    if (!toPondId) {
      const [created] = await tx.insert(schema.ponds).values({ name: target.newPondName! }).returning({ id: schema.ponds.id })
      await tx.insert(schema.memberships).values({ pondId: created!.id, userId: user.id, role: 'owner' })
      toPondId = created!.id
    }
    await lockPonds(tx, [found.fromPondId, toPondId])
    const [offer] = await tx.select().from(schema.fishTransfers).where(eq(schema.fishTransfers.id, found.id)).for('update')
    const state = offerState(offer!, Boolean(offer!.supersededReason))
    if (state !== 'open') throw closedOfferError(state, 'offer', offer!.supersededReason ?? undefined)
    const fish = await lockedFish(tx, offer!.fishId)
    if (fish.pondId !== offer!.fromPondId) throw closedOfferError('superseded', 'offer', 'the fish has moved since this offer was made.')
    if (fish.pondId === toPondId) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'The fish already lives in this pond', data: { fieldErrors: { toPondId: ['The fish already lives in this pond'] } } })
    if (!await isOwnerOf(tx, offer!.fromPondId, offer!.fromUserId)) {
      throw createError({ statusCode: 409, statusMessage: 'Offer no longer valid', message: 'The person who offered this fish no longer owns its pond, so the offer no longer stands.' })
    }
    if (!await isOwnerOf(tx, toPondId, user.id)) throw createError({ statusCode: 403, statusMessage: 'Only a pond owner may do this', message: 'Choose a pond you own.' })
    const companions = await companionsLeftBehind(tx, fish)
    if (companions.length && !offer!.confirmedSeparation) {
      throw createError({ statusCode: 409, statusMessage: 'Companions would be separated', message: `${fish.name} now has companions in its pond that the offer did not account for. Ask the owner to offer it again.`, data: { companions } })
    }
    const [from, to] = [await pondRef(tx, fish.pondId), await pondRef(tx, toPondId)]
    const [sender] = await tx.select({ name: schema.users.name }).from(schema.users).where(eq(schema.users.id, offer!.fromUserId))
    const entry = await moveFish(event, tx, { fish, from, to, actorId: user.id, companions, transfer: { id: offer!.id, fromOwner: sender!.name, toOwner: user.name } })
    await tx.update(schema.fishTransfers).set({ acceptedAt: new Date(), acceptedById: user.id, toPondId }).where(eq(schema.fishTransfers.id, offer!.id))
    return { fishId: fish.id, pondId: toPondId, moveEntryId: entry.id, separatedFrom: companions }
  })
}
