// The health record's read queries: every entry of the fish up to the moment the record is printed,
// oldest first, read in keyset pages so a fish with thousands of entries never loads in one piece.
import { sql } from 'drizzle-orm'
import { AUTHOR_COLUMNS, authorJoins, dosesOf, type TimelineCursor } from './timeline'

const CURSOR_TEXT = sql.raw(`'YYYY-MM-DD"T"HH24:MI:SS.US"Z"'`)

/** Entries written on this fish, and companion notes written on another fish about it, recorded by `asOf`. */
function recordSources(fishId: string, asOf: string) {
  return {
    own: sql`e.fish_id = ${fishId} and e.created_at <= ${asOf}::timestamptz`,
    related: sql`e.related_fish_id = ${fishId} and e.kind = 'companion' and e.fish_id <> ${fishId} and e.created_at <= ${asOf}::timestamptz`,
  }
}

/** How many entries the record holds: the number its completeness line promises. */
export function recordCountSql(fishId: string, asOf: string) {
  const { own, related } = recordSources(fishId, asOf)
  return sql<{ count: number }>`select
    (select count(*) from timeline_entries e where ${own})::int + (select count(*) from timeline_entries e where ${related})::int as count`
}

/** One page of the record, oldest first, after the cursor. */
export function recordPageSql(fishId: string, options: { asOf: string, cursor: TimelineCursor | null, limit: number }) {
  const { own, related } = recordSources(fishId, options.asOf)
  const n = options.limit + 1
  const after = options.cursor ? sql`and (e.occurred_at, e.id) > (${options.cursor.at}::timestamptz, ${options.cursor.id}::uuid)` : sql``
  return sql`
    select page.*, to_char(page.occurred_at at time zone 'UTC', ${CURSOR_TEXT}) as cursor_at,
      ${AUTHOR_COLUMNS}, other.name as other_fish_name, ${dosesOf(sql`page`)} as doses
    from (
      (select e.id, e.kind::text as kind, e.occurred_at, e.author_id, e.imported_author_id, e.data, e.revision, e.entered_in_error, e.error_reason,
          e.error_by_id, e.imported_error_by_id, e.error_at, 'subject'::text as viewpoint, e.related_fish_id as other_fish_id, e.linked_entry_id, e.photo_id, e.created_at
        from timeline_entries e where ${own} ${after}
        order by e.occurred_at, e.id limit ${n})
      union all
      (select e.id, e.kind::text as kind, e.occurred_at, e.author_id, e.imported_author_id, e.data, e.revision, e.entered_in_error, e.error_reason,
          e.error_by_id, e.imported_error_by_id, e.error_at, 'related'::text as viewpoint, e.fish_id as other_fish_id, e.linked_entry_id, e.photo_id, e.created_at
        from timeline_entries e where ${related} ${after}
        order by e.occurred_at, e.id limit ${n})
    ) page
    ${authorJoins(sql`page`)}
    left join fish other on other.id = page.other_fish_id
    order by page.occurred_at, page.id
    limit ${n}`
}

export interface RecordAuthorRow extends Record<string, unknown> {
  author_id: string
  name: string
  /** Named by a pond archive this pond was imported from, not a local account. */
  imported: boolean
  kind: string
  status: string | null
  instructed_by: string | null
  entries: number
  first_at: Date
  last_at: Date
}

/**
 * Who wrote the fish's clinical kinds, grouped by the parts of the content that decide whether an
 * entry is clinical (a keeper's suspected problem or a treatment given on instruction is not).
 */
export function recordClinicalAuthorsSql(fishId: string, kinds: readonly string[]) {
  return sql<RecordAuthorRow>`
    select coalesce(u.id, ia.id) as author_id, coalesce(u.name, ia.name) as name, ia.id is not null as imported,
      e.kind::text as kind, e.data->>'status' as status, e.data->>'instructedById' as instructed_by,
      count(*)::int as entries, min(e.occurred_at) as first_at, max(e.occurred_at) as last_at
    from timeline_entries e left join users u on u.id = e.author_id left join archive_people ia on ia.id = e.imported_author_id
    where e.fish_id = ${fishId} and not e.entered_in_error and e.kind = any(${sql.param(kinds)}::timeline_kind[])
    group by coalesce(u.id, ia.id), coalesce(u.name, ia.name), ia.id is not null, e.kind, e.data->>'status', e.data->>'instructedById'`
}
