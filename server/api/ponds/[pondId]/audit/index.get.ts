import { z } from 'zod'
import { and, desc, eq, inArray, sql } from 'drizzle-orm'
import { AUDIT_ACTIONS, describeAuditEvent, type AuditAction, type AuditPage } from '#shared/utils/audit-actions'
import { pondIdParams } from '#shared/utils/pond-schemas'

const MARKER = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2})(?:\.\d{1,6})?Z\|[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i

/** A marker this log wrote: a real UTC time (no 30 February, no hour 25) and an id. */
function isPageMarker(text: string) {
  const parts = text.match(MARKER)?.slice(1, 7).map(Number)
  if (!parts) return false
  const [year, month, day, hour, minute, second] = parts as [number, number, number, number, number, number]
  const time = new Date(Date.UTC(year, month - 1, day, hour, minute, second))
  return time.getUTCFullYear() === year && time.getUTCMonth() === month - 1 && time.getUTCDate() === day
    && time.getUTCHours() === hour && time.getUTCMinutes() === minute && time.getUTCSeconds() === second
}

const query = z.strictObject({
  before: z.string().trim().refine(isPageMarker, 'Not a page marker from this log').optional(),
  limit: z.coerce.number('Enter a number').int('A whole number').min(1, 'At least 1').max(200, 'At most 200').default(50),
})

// Owners only: the log names people, addresses and browsers.
export default defineEventHandler(async (event): Promise<AuditPage> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId, ['owner'])
  const { before, limit } = await queryValidated(event, query)
  const [beforeAt, beforeId] = before ? before.split('|') : []
  // Microseconds in the marker: two lines written in the same millisecond must not be skipped or shown twice.
  const cursorAt = sql<string>`to_char(${schema.auditEvents.createdAt} at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"')`
  const rows = await useDb().select({ event: schema.auditEvents, actorName: schema.users.name, cursorAt })
    .from(schema.auditEvents)
    .innerJoin(schema.users, eq(schema.users.id, schema.auditEvents.actorId))
    .where(and(
      eq(schema.auditEvents.pondId, pondId),
      before ? sql`(${schema.auditEvents.createdAt}, ${schema.auditEvents.id}) < (${beforeAt}::timestamptz, ${beforeId}::uuid)` : undefined,
    ))
    .orderBy(desc(schema.auditEvents.createdAt), desc(schema.auditEvents.id))
    .limit(limit + 1)
  const page = rows.slice(0, limit)
  const last = page.at(-1)
  const subjectIds = [...new Set(page.map(r => r.event.details.userId).filter((id): id is string => typeof id === 'string'))]
  const subjects = new Map(subjectIds.length
    ? (await useDb().select({ id: schema.users.id, name: schema.users.name }).from(schema.users).where(inArray(schema.users.id, subjectIds))).map(u => [u.id, u.name])
    : [])
  return {
    events: page.map(({ event: e, actorName }) => {
      const subjectId = typeof e.details.userId === 'string' ? e.details.userId : null
      const subject = subjectId && subjects.has(subjectId) ? { id: subjectId, name: subjects.get(subjectId)! } : null
      return {
        id: e.id,
        action: e.action as AuditAction,
        label: AUDIT_ACTIONS[e.action as AuditAction] ?? e.action,
        actor: { id: e.actorId, name: actorName },
        subject,
        summary: describeAuditEvent(e.action, e.details, subject?.name),
        details: e.details,
        ip: e.ip,
        userAgent: e.userAgent,
        createdAt: e.createdAt.toISOString(),
      }
    }),
    nextCursor: rows.length > limit && last ? `${last.cursorAt}|${last.event.id}` : null,
  }
})
