import { sql } from 'drizzle-orm'
import type { Tx } from './db'

// Kinds the custody work writes itself; people do not add them through the timeline form.
type CustodyKind = 'move' | 'owner_change' | 'observation'

export interface CustodyEntry {
  fishId: string
  pondId: string
  kind: CustodyKind
  occurredAt: Date
  authorId: string
  data: Record<string, unknown>
}

/** Writes entries with their first revision, as every timeline entry has one (drizzle/0004 guards the rest). */
export async function writeCustodyEntries(tx: Tx, entries: CustodyEntry[]) {
  if (!entries.length) return []
  const written = await tx.insert(schema.timelineEntries).values(entries).returning()
  await tx.insert(schema.timelineRevisions).values(written.map(e => ({ entryId: e.id, revision: 1, occurredAt: e.occurredAt, data: e.data, authorId: e.authorId })))
  return written
}

/** One owner_change entry on every fish of the pond, in two statements however many fish it holds. */
export async function writeOwnerChangeEntries(tx: Tx, pondId: string, occurredAt: Date, authorId: string, data: Record<string, unknown>) {
  const result = await tx.execute(sql`
    with written as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
      select f.id, f.pond_id, 'owner_change', ${occurredAt.toISOString()}::timestamptz, ${authorId}, ${JSON.stringify(data)}::jsonb
      from fish f where f.pond_id = ${pondId}
      returning id, occurred_at, data, author_id
    )
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
    select id, 1, occurred_at, data, author_id from written`)
  return result.rowCount ?? 0
}

/** Takes the pond rows in a fixed order, so two custody actions on the same ponds queue instead of deadlocking. */
export async function lockPonds(tx: Tx, pondIds: string[]) {
  const ids = [...new Set(pondIds)].sort()
  await tx.execute(sql`select id from ponds where id in (${sql.join(ids.map(id => sql`${id}::uuid`), sql`, `)}) order by id for update`)
}
