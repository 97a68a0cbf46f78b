import { asc, eq } from 'drizzle-orm'
import { entryIdParams } from '#shared/utils/timeline-schemas'
import type { TimelineRevisionView } from '#shared/types/timeline'

export default defineEventHandler(async (event): Promise<TimelineRevisionView[]> => {
  const { entryId } = paramsValidated(event, entryIdParams, 'Entry not found')
  await requireEntryAccess(event, entryId)
  const rows = await useDb().select({ revision: schema.timelineRevisions, authorName: schema.users.name })
    .from(schema.timelineRevisions)
    .innerJoin(schema.users, eq(schema.users.id, schema.timelineRevisions.authorId))
    .where(eq(schema.timelineRevisions.entryId, entryId))
    .orderBy(asc(schema.timelineRevisions.revision))
  return rows.map(({ revision: r, authorName }) => ({
    revision: r.revision, occurredAt: r.occurredAt.toISOString(), data: r.data,
    author: { id: r.authorId, name: authorName }, reason: r.reason, createdAt: r.createdAt.toISOString(),
  }))
})
