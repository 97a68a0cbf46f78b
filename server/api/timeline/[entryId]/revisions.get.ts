import { asc, eq } from 'drizzle-orm'
import { entryIdParams } from '#shared/utils/timeline-schemas'

export default defineEventHandler(async (event) => {
  const { entryId } = paramsValidated(event, entryIdParams, 'Entry not found')
  await requireEntryAccess(event, entryId)
  const rows = await useDb().select({ revision: schema.timelineRevisions, authorName: schema.users.name, importedName: schema.archivePeople.name })
    .from(schema.timelineRevisions)
    .leftJoin(schema.users, eq(schema.users.id, schema.timelineRevisions.authorId))
    .leftJoin(schema.archivePeople, eq(schema.archivePeople.id, schema.timelineRevisions.importedAuthorId))
    .where(eq(schema.timelineRevisions.entryId, entryId))
    .orderBy(asc(schema.timelineRevisions.revision))
  return rows.map(({ revision: r, authorName, importedName }) => ({
    revision: r.revision, occurredAt: r.occurredAt.toISOString(), data: r.data,
    // An archive's person (id of that record) when the revision was read in from a pond archive.
    author: { id: (r.authorId ?? r.importedAuthorId)!, name: authorName ?? importedName ?? '', imported: !r.authorId },
    reason: r.reason, createdAt: r.createdAt.toISOString(),
  }))
})
