import { desc, eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  const rows = await useDb().select().from(schema.visits).where(eq(schema.visits.pondId, pondId))
    .orderBy(desc(schema.visits.visitedOn), desc(schema.visits.openedAt)).limit(200)
  return { visits: await Promise.all(rows.map(row => visitView(row))) }
})
