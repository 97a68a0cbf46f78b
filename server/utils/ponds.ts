import { and, count, eq, sql } from 'drizzle-orm'
import type { PondRole } from '#shared/types'

// Spelled out: Drizzle leaves columns unqualified in single-table selects, which would bind ponds.id to fish.id here.
const aliveFishCount = sql<number>`(select count(*)::int from fish where fish.pond_id = ponds.id and fish.status = 'alive')`

export async function listPondsOf(userId: string) {
  return useDb().select({
    id: schema.ponds.id, name: schema.ponds.name, volumeLitres: schema.ponds.volumeLitres,
    role: schema.memberships.role, fishCount: aliveFishCount,
  }).from(schema.memberships)
    .innerJoin(schema.ponds, eq(schema.ponds.id, schema.memberships.pondId))
    .where(eq(schema.memberships.userId, userId))
    .orderBy(schema.ponds.name)
}

/**
 * A pond as its page reads it: `volumeMeasurement` is the shape, unit and readings (null when the volume was typed
 * as a number), `healthCheckDay` the yearly check's MM-DD; `readOnly` when kept on after a handover to look, not to change.
 */
export async function pondDetail(pondId: string, role: PondRole, readOnly = false) {
  const [pond] = await useDb().select({
    id: schema.ponds.id, name: schema.ponds.name, volumeLitres: schema.ponds.volumeLitres, volumeMeasurement: schema.ponds.volumeMeasurement, notes: schema.ponds.notes,
    healthCheckDay: schema.ponds.healthCheckDay, waterTestIntervalDays: schema.ponds.waterTestIntervalDays,
    createdAt: schema.ponds.createdAt, updatedAt: schema.ponds.updatedAt, fishCount: aliveFishCount,
  }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  if (!pond) throw createError({ statusCode: 404, statusMessage: 'Pond not found' })
  return { ...pond, role, readOnly, createdAt: pond.createdAt.toISOString(), updatedAt: pond.updatedAt.toISOString() }
}

export async function ownerCount(pondId: string) {
  const [row] = await useDb().select({ n: count() }).from(schema.memberships)
    .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.role, 'owner')))
  return row?.n ?? 0
}
