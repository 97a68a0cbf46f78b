import { sql, type SQL } from 'drizzle-orm'
import type { PondEventView } from '#shared/types/pond-care'
import type { Tx } from './db'

/**
 * The fish living in the pond at the event's moment, through the one residence rule of migration 0018
 * (fintrail_fish_pond_at). Candidates are the fish there now and those with a move into or out of it.
 */
export function residentFishSql(pondId: string, moment: SQL) {
  return sql`select f.id, f.name from fish f
    where f.id in (
      select id from fish where pond_id = ${pondId}
      union select fish_id from timeline_entries
        where kind = 'move' and (data->'fromPond'->>'id' = ${pondId}::text or data->'toPond'->>'id' = ${pondId}::text))
      and fintrail_fish_pond_at(f.id, ${moment}) = ${pondId}::uuid
    order by f.name, f.id`
}

export async function residentFish(db: { execute: Tx['execute'] }, pondId: string, at: Date) {
  const { rows } = await db.execute<{ id: string, name: string }>(residentFishSql(pondId, sql`${at.toISOString()}::timestamptz`))
  return rows
}

interface PondEventRow extends Record<string, unknown> {
  id: string
  kind: PondEventView['kind']
  occurred_at: Date
  author_id: string
  author_name: string
  visit_id: string | null
  volume_litres: string | null
  data: Record<string, unknown>
  entered_in_error: boolean
  error_reason: string | null
  error_by_name: string | null
  fish: { id: string, name: string }[]
}

/** A pond's events newest first (or one of them), each with the fish that were living there then. */
export async function pondEventViews(pondId: string, options: { eventId?: string, visitId?: string, limit?: number } = {}): Promise<PondEventView[]> {
  const { rows } = await useDb().execute<PondEventRow>(sql`
    select pe.id, pe.kind::text as kind, pe.occurred_at, pe.author_id, author.name as author_name, pe.visit_id, pe.volume_litres,
      pe.data, pe.entered_in_error, pe.error_reason, marker.name as error_by_name,
      (select coalesce(json_agg(json_build_object('id', r.id, 'name', r.name)), '[]'::json) from (${residentFishSql(pondId, sql`pe.occurred_at`)}) r) as fish
    from pond_events pe
    join users author on author.id = pe.author_id
    left join users marker on marker.id = pe.error_by_id
    where pe.pond_id = ${pondId}
      ${options.eventId ? sql`and pe.id = ${options.eventId}` : sql``}
      ${options.visitId ? sql`and pe.visit_id = ${options.visitId}` : sql``}
    order by pe.occurred_at desc, pe.id desc
    limit ${options.limit ?? 100}`)
  return rows.map(row => ({
    id: row.id,
    kind: row.kind,
    occurredAt: new Date(row.occurred_at).toISOString(),
    author: { id: row.author_id, name: row.author_name },
    visitId: row.visit_id,
    volumeLitres: row.volume_litres === null ? null : Number(row.volume_litres),
    data: row.data,
    enteredInError: row.entered_in_error,
    errorReason: row.error_reason,
    errorBy: row.error_by_name,
    fish: row.fish,
  }))
}
