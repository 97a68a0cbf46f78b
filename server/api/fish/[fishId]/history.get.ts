import { desc, eq, sql } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId)
  const rows = await useDb().select({
    id: schema.fishEdits.id, at: schema.fishEdits.createdAt, changes: schema.fishEdits.changes,
    // A change read in from a pond archive names the archive's person, never a local account.
    by: sql<string>`coalesce(${schema.users.name}, ${schema.archivePeople.name})`, imported: sql<boolean>`${schema.fishEdits.importedAuthorId} is not null`,
  }).from(schema.fishEdits)
    .leftJoin(schema.users, eq(schema.users.id, schema.fishEdits.userId))
    .leftJoin(schema.archivePeople, eq(schema.archivePeople.id, schema.fishEdits.importedAuthorId))
    .where(eq(schema.fishEdits.fishId, fishId))
    .orderBy(desc(schema.fishEdits.createdAt))
    .limit(200)
  return rows
})
