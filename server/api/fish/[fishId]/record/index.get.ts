import { and, asc, eq } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'
import { RECORD_PAGE_SIZE } from '#shared/utils/record-schemas'
import { ENTRY_RULES, isClinicalEntry } from '#shared/utils/timeline-rules'
import type { EntryKind } from '#shared/utils/timeline-schemas'
import { recordClinicalAuthorsSql, recordCountSql, type RecordAuthorRow } from '../../../../db/queries/record'

// Kinds that can be clinical at all; the rule table then decides entry by entry (a keeper's suspected problem is not).
const CLINICAL_KINDS = (Object.keys(ENTRY_RULES) as EntryKind[]).filter(kind => ENTRY_RULES[kind].clinical !== false)

/**
 * The head of the health record: what it covers, who owns and treated the fish; the entries follow in pages of
 * `pageSize`. `asOf` is the moment the record was opened (it holds every entry written up to then); `entryCount`
 * counts those entries, the ones entered in error included (they stay visible, struck through).
 * The app reads this answer's type from the route (`ApiResponse<'/api/fish/:fishId/record'>`).
 */
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish } = await requireFishRole(event, fishId)
  const asOf = new Date().toISOString()
  const db = useDb()
  const [{ rows: [counted] }, pond, owners, { rows: authors }] = await Promise.all([
    db.execute<{ count: number }>(recordCountSql(fishId, asOf)),
    db.select({ id: schema.ponds.id, name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, fish.pondId)),
    db.select({ id: schema.users.id, name: schema.users.name }).from(schema.memberships)
      .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
      .where(and(eq(schema.memberships.pondId, fish.pondId), eq(schema.memberships.role, 'owner')))
      .orderBy(asc(schema.users.name)),
    db.execute<RecordAuthorRow>(recordClinicalAuthorsSql(fishId, CLINICAL_KINDS)),
  ])
  return { asOf, entryCount: counted!.count, pond: pond[0]!, owners, vets: clinicians(authors), pageSize: RECORD_PAGE_SIZE }
})

/**
 * A person who wrote clinical entries on the fish (exams, procedures, anaesthesia, treatments, lab results,
 * confirmed problems): how many, first and last. `imported`: named as author by a pond archive this pond was
 * imported from, not a person with an account here.
 */
interface RecordVet { name: string, entries: number, firstAt: string, lastAt: string, imported: boolean }

function clinicians(rows: RecordAuthorRow[]): RecordVet[] {
  const byAuthor = new Map<string, RecordVet>()
  for (const row of rows) {
    if (!isClinicalEntry(row.kind as EntryKind, { status: row.status ?? undefined, instructedById: row.instructed_by ?? undefined })) continue
    const [first, last] = [new Date(row.first_at).toISOString(), new Date(row.last_at).toISOString()]
    const known = byAuthor.get(row.author_id)
    if (!known) byAuthor.set(row.author_id, { name: row.name, entries: row.entries, firstAt: first, lastAt: last, imported: row.imported })
    else Object.assign(known, { entries: known.entries + row.entries, firstAt: first < known.firstAt ? first : known.firstAt, lastAt: last > known.lastAt ? last : known.lastAt })
  }
  return [...byAuthor.values()].sort((a, b) => b.lastAt.localeCompare(a.lastAt))
}
