import { and, desc, eq, inArray } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { POND_EVENT_KINDS, pondEventLabel, type PondEventKind, type PondFishEvent } from '#shared/utils/pond-events'

// The fish events of this pond for the water charts: what happened to which fish while it lived here.
export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  const rows = await useDb().select({
    id: schema.timelineEntries.id, fishId: schema.timelineEntries.fishId, fishName: schema.fish.name,
    kind: schema.timelineEntries.kind, occurredAt: schema.timelineEntries.occurredAt, data: schema.timelineEntries.data,
  }).from(schema.timelineEntries)
    .innerJoin(schema.fish, eq(schema.fish.id, schema.timelineEntries.fishId))
    .where(and(
      eq(schema.timelineEntries.pondId, pondId),
      inArray(schema.timelineEntries.kind, [...POND_EVENT_KINDS]),
      eq(schema.timelineEntries.enteredInError, false),
    ))
    .orderBy(desc(schema.timelineEntries.occurredAt))
    .limit(2000)
  return {
    // The where clause keeps only the kinds a chart marks.
    events: rows.map((r): PondFishEvent => ({
      id: r.id, fishId: r.fishId, fishName: r.fishName, kind: r.kind as PondEventKind,
      occurredAt: r.occurredAt.toISOString(), label: pondEventLabel(r.kind, r.data),
    })),
  }
})
