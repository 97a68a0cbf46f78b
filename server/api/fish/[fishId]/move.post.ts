import { fishIdParams } from '#shared/utils/fish-schemas'
import { fishMoveSchema } from '#shared/utils/custody-schemas'

/** Moves a fish to another pond of the same owner: the caller must own both. */
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { user, fish } = await requireFishRole(event, fishId, ['owner'])
  const input = await readValidated(event, fishMoveSchema)
  if (input.toPondId === fish.pondId) {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'The fish already lives in this pond', data: { fieldErrors: { toPondId: ['The fish already lives in this pond'] } } })
  }
  await requirePondRole(event, input.toPondId, ['owner'])

  const moved = await useDb().transaction(async (tx) => {
    await lockPonds(tx, [fish.pondId, input.toPondId])
    const current = await lockedFish(tx, fishId)
    if (current.pondId !== fish.pondId) throw createError({ statusCode: 409, statusMessage: 'Moved meanwhile', message: 'This fish was moved by someone else just now. Reload and try again.' })
    // Ownership is read again under the locks: a handover accepted a moment ago must win over this move.
    if (!await isOwnerOf(tx, current.pondId, user.id) || !await isOwnerOf(tx, input.toPondId, user.id)) {
      throw createError({ statusCode: 403, statusMessage: 'Only a pond owner may do this', message: 'You must own both ponds to move a fish between them.' })
    }
    const companions = await companionsLeftBehind(tx, current)
    if (companions.length && !input.confirmSeparation) throw separationNeedsConfirmation(current.name, companions)
    const [from, to] = [await pondRef(tx, current.pondId), await pondRef(tx, input.toPondId)]
    const entry = await moveFish(event, tx, { fish: current, from, to, actorId: user.id, companions })
    return { entryId: entry.id, from, to, separatedFrom: companions }
  })
  return { fishId, pondId: moved.to.id, moveEntryId: moved.entryId, fromPond: moved.from, toPond: moved.to, separatedFrom: moved.separatedFrom }
})
