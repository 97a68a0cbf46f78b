import { and, eq, isNull } from 'drizzle-orm'
import type { Tx } from './db'

/** The visit this person has open at this pond, if any: what they record there meanwhile belongs to it. */
export async function openVisitId(tx: Pick<Tx, 'select'>, pondId: string, userId: string): Promise<string | null> {
  const [visit] = await tx.select({ id: schema.visits.id }).from(schema.visits)
    .where(and(eq(schema.visits.pondId, pondId), eq(schema.visits.vetId, userId), isNull(schema.visits.closedAt)))
  return visit?.id ?? null
}

/** Only the vet who opened a visit changes or closes it, and only while it is open. */
export function refuseUnlessOpenVisitOf(visit: typeof schema.visits.$inferSelect, userId: string) {
  if (visit.vetId !== userId) throw createError({ statusCode: 403, statusMessage: 'Not allowed', message: 'Only the vet who opened this visit can change or close it' })
  if (visit.closedAt) throw createError({ statusCode: 409, statusMessage: 'Visit closed', message: 'This visit is closed' })
}
