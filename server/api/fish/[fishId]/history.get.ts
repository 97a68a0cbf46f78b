import { desc, eq } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId)
  const rows = await useDb().select({
    id: schema.fishEdits.id, at: schema.fishEdits.createdAt, by: schema.users.name, changes: schema.fishEdits.changes,
  }).from(schema.fishEdits)
    .innerJoin(schema.users, eq(schema.users.id, schema.fishEdits.userId))
    .where(eq(schema.fishEdits.fishId, fishId))
    .orderBy(desc(schema.fishEdits.createdAt))
    .limit(200)
  return rows
})
