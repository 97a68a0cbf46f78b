import { and, eq, exists, sql } from 'drizzle-orm'
import { DUE_KIND_LABELS, dayOf } from '#shared/utils/due'
import type { DueItemDetail } from '#shared/types/pond-care'
import { formatDay } from '#shared/utils/dates'

export const DUE_DIGEST_JOB = 'due-digest'
// Every morning at 06:00 UTC.
export const DUE_DIGEST_CRON = '0 6 * * *'

/** The origin for links in a mail sent by a job, which has no request to read it from. */
export function configuredOrigin() {
  const configured = String(useRuntimeConfig().appOrigin || '').split(',')[0]?.trim()
  return configured || `http://127.0.0.1:${process.env.PORT ?? 3000}`
}

export function dueDigestText(name: string, items: DueItemDetail[], origin: string) {
  const lines = [`Good morning ${name},`, '', 'This is what is due in your ponds:', '']
  let pond = ''
  for (const item of items) {
    if (item.pondName !== pond) {
      pond = item.pondName
      lines.push(pond)
    }
    lines.push(`- ${formatDay(item.dueOn)}${item.overdue ? ' (overdue)' : ''}: ${DUE_KIND_LABELS[item.kind]}${item.fishName ? ` for ${item.fishName}` : ''}${item.about ? ` — ${item.about}` : ''}`)
  }
  lines.push('', `Your list: ${origin}/due`, '', `Turn this e-mail off on your account page: ${origin}/account`)
  return lines.join('\n')
}

/**
 * The daily digest: one e-mail to each person who wants it and has something due, at most one per
 * person and day (due_digests), so a retried or repeated run sends nothing twice. `now` is the job's
 * clock, so a test can run the day it chooses.
 */
export async function sendDueDigests(now: Date, origin: string) {
  const db = useDb()
  const day = dayOf(now)
  const people = await db.select({ id: schema.users.id, name: schema.users.name, email: schema.users.email }).from(schema.users)
    .where(and(eq(schema.users.dueDigest, true), exists(db.select({ one: sql`1` }).from(schema.memberships)
      .where(and(eq(schema.memberships.userId, schema.users.id), eq(schema.memberships.readOnly, false))))))
  let sent = 0
  for (const person of people) {
    const items = await dueDetails({ userId: person.id }, now)
    if (!items.length) continue
    const queued = await db.transaction(async (tx) => {
      const [claimed] = await tx.insert(schema.dueDigests).values({ userId: person.id, day }).onConflictDoNothing().returning()
      if (!claimed) return false
      const overdue = items.filter(i => i.overdue).length
      await queueMail(tx, {
        to: person.email, kind: 'due-digest', subjectType: 'due-digest', subjectId: person.id,
        subject: `Due in your ponds: ${items.length} ${items.length === 1 ? 'item' : 'items'}${overdue ? `, ${overdue} overdue` : ''}`,
        text: dueDigestText(person.name, items, origin),
      })
      return true
    })
    if (queued) sent++
  }
  return { day, sent }
}
