import { desc, eq } from 'drizzle-orm'

/** A pond's vet visits, newest first (`GET /api/ponds/:id/visits` and the pond's page route). */
export async function visitsOfPond(pondId: string) {
  const rows = await useDb().select().from(schema.visits).where(eq(schema.visits.pondId, pondId))
    .orderBy(desc(schema.visits.visitedOn), desc(schema.visits.openedAt)).limit(200)
  return { visits: await Promise.all(rows.map(row => visitView(row))) }
}
