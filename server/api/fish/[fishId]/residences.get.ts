import { and, asc, eq } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'
import type { FishResidence } from '#shared/utils/custody-schemas'

type PondRef = { id: string, name: string }

/** Where the fish has lived, oldest first, read from its move entries: the first pond from its arrival. */
export default defineEventHandler(async (event): Promise<FishResidence[]> => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { user, fish } = await requireFishRole(event, fishId)
  const moves = await useDb().select({ occurredAt: schema.timelineEntries.occurredAt, data: schema.timelineEntries.data })
    .from(schema.timelineEntries)
    .where(and(eq(schema.timelineEntries.fishId, fishId), eq(schema.timelineEntries.kind, 'move'), eq(schema.timelineEntries.enteredInError, false)))
    .orderBy(asc(schema.timelineEntries.occurredAt), asc(schema.timelineEntries.id))
  const [current] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, fish.pondId))
  const mine = new Set((await listPondsOf(user.id)).map(p => p.id))
  const arrived = fish.acquiredOn ?? fish.createdAt.toISOString().slice(0, 10)
  const stays: { pond: PondRef, from: string, until: string | null }[] = []
  let pond: PondRef = moves.length ? moves[0]!.data.fromPond as PondRef : { id: fish.pondId, name: current!.name }
  let from = arrived
  for (const move of moves) {
    const day = move.occurredAt.toISOString().slice(0, 10)
    stays.push({ pond, from, until: day })
    pond = move.data.toPond as PondRef
    from = day
  }
  stays.push({ pond: { id: fish.pondId, name: current!.name }, from, until: null })
  // Names as they were at the move, but today's name for a pond the caller can still open.
  return stays.map(s => ({
    pondId: s.pond.id, pondName: s.pond.id === fish.pondId ? current!.name : s.pond.name,
    from: s.from, until: s.until, current: s.until === null, visible: mine.has(s.pond.id),
  }))
})
