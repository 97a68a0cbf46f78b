// Runs `upgradeEntryData` over stored entries: each changed entry gets a new revision with the
// reason, written by the entry's author, local or from an archive (the database only lets an entry change with a revision).
// Entries entered in error stay as they are: they are never amended and leave every fact.
import { sql, type SQL } from 'drizzle-orm'
import type { NodePgDatabase } from 'drizzle-orm/node-postgres'
import { UPGRADE_CANDIDATES, UPGRADE_REASON, upgradeEntryData } from '../../shared/utils/timeline-upgrade'

type Executor = Pick<NodePgDatabase, 'execute'>

export async function upgradeLegacyEntries(db: Executor, scope: SQL = sql`true`): Promise<number> {
  const { rows } = await db.execute<{ id: string, kind: string, data: Record<string, unknown>, revision: number, occurred_at: Date, author_id: string | null, imported_author_id: string | null }>(sql`
    select e.id, e.kind::text as kind, e.data, e.revision, e.occurred_at, e.author_id, e.imported_author_id from timeline_entries e
    where not e.entered_in_error and (${sql.raw(UPGRADE_CANDIDATES)}) and ${scope}`)
  let upgraded = 0
  for (const row of rows) {
    const data = upgradeEntryData(row.kind, row.data)
    if (!data) continue
    const revision = row.revision + 1
    const json = JSON.stringify(data)
    await db.execute(sql`insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id, imported_author_id, reason)
      values (${row.id}, ${revision}, ${row.occurred_at}, ${json}::jsonb, ${row.author_id}, ${row.imported_author_id}, ${UPGRADE_REASON})`)
    await db.execute(sql`update timeline_entries set data = ${json}::jsonb, revision = ${revision}, updated_at = now() where id = ${row.id}`)
    upgraded++
  }
  return upgraded
}
