// The timeline's read queries, kept apart with explicit imports so the benchmark times the very SQL the routes run.
import { sql, type SQL } from 'drizzle-orm'
import type { PondRole } from '../../../shared/types'
import type { TimelineKind } from '../../../shared/utils/timeline-schemas'
import { PROLONGED_RECOVERY_MINUTES } from '../../../shared/utils/timeline-derived'

export interface TimelineCursor { at: string, id: string }

export interface TimelineRow extends Record<string, unknown> {
  id: string
  kind: TimelineKind
  occurred_at: Date
  cursor_at: string
  author_id: string | null
  author_name: string | null
  /** Set when the entry was read in from a pond archive (the author is then the archive's person, author_id null). */
  imported_author_name: string | null
  imported_author_role: PondRole | null
  imported_exported_at: Date | null
  imported_at: Date | null
  imported_by_name: string | null
  data: Record<string, unknown>
  revision: number
  entered_in_error: boolean
  error_reason: string | null
  error_by_name: string | null
  error_at: Date | null
  viewpoint: 'subject' | 'related'
  other_fish_id: string | null
  other_fish_name: string | null
  linked_entry_id: string | null
  photo_id: string | null
  created_at: Date
  /** For a treatment: the doses checked off as given. */
  doses?: { doseNumber: number, givenAt: string, givenBy: { id: string, name: string } | null, note: string }[] | null
}

/** The doses given of a treatment course (rows of `alias`, a timeline entry or page row), oldest dose first; the giver local or from an archive. */
export function dosesOf(alias: SQL) {
  return sql`case when ${alias}.kind::text = 'treatment' then (select coalesce(json_agg(json_build_object('doseNumber', d.dose_number,
      'givenAt', to_char(d.given_at at time zone 'UTC', ${CURSOR_TEXT}),
      'givenBy', json_build_object('id', coalesce(giver.id, imported_giver.id), 'name', coalesce(giver.name, imported_giver.name)), 'note', d.note)
      order by d.dose_number), '[]'::json)
    from treatment_doses d left join users giver on giver.id = d.given_by_id left join archive_people imported_giver on imported_giver.id = d.imported_given_by_id
    where d.entry_id = ${alias}.id) end`
}

/**
 * Who wrote a row (alias: a timeline entry or page row with author_id, imported_author_id, error_by_id and
 * imported_error_by_id): the local person, or the archive's person with the import it came in with.
 */
export function authorJoins(alias: SQL) {
  return sql`left join users author on author.id = ${alias}.author_id
    left join users marker on marker.id = ${alias}.error_by_id
    left join archive_people imported_author on imported_author.id = ${alias}.imported_author_id
    left join pond_imports imported_from on imported_from.id = imported_author.import_id
    left join users importer on importer.id = imported_from.imported_by_id
    left join archive_people imported_marker on imported_marker.id = ${alias}.imported_error_by_id`
}

/** The columns authorJoins makes available, named as TimelineRow names them. */
export const AUTHOR_COLUMNS = sql.raw(`author.name as author_name, coalesce(marker.name, imported_marker.name) as error_by_name,
  imported_author.name as imported_author_name, imported_author.role::text as imported_author_role,
  imported_from.exported_at as imported_exported_at, imported_from.created_at as imported_at, importer.name as imported_by_name`)

const CURSOR_TEXT = sql.raw(`'YYYY-MM-DD"T"HH24:MI:SS.US"Z"'`)

/**
 * One page of a fish's life, newest first: its own entries, companion notes written on the other
 * fish, and its ready photos. Keyset pagination on (occurred_at, id); each branch stops at the page
 * size so a fish with thousands of entries reads one index range, not its whole history.
 */
export function timelinePageSql(fishId: string, options: { kinds: readonly TimelineKind[], cursor: TimelineCursor | null, limit: number }) {
  const { kinds, cursor } = options
  const n = options.limit + 1
  const all = kinds.length === 0
  const entryKinds = kinds.filter(k => k !== 'photo' && k !== 'pond_event')
  const before = (at: SQL, id: SQL) => (cursor ? sql`and (${at}, ${id}) < (${cursor.at}::timestamptz, ${cursor.id}::uuid)` : sql``)
  const branches: SQL[] = []
  if (all || entryKinds.length) {
    const kindFilter = all ? sql`` : sql`and e.kind = any(${sql.param(entryKinds)}::timeline_kind[])`
    branches.push(sql`(select e.id, e.kind::text as kind, e.occurred_at, e.author_id, e.imported_author_id, e.data, e.revision, e.entered_in_error, e.error_reason,
        e.error_by_id, e.imported_error_by_id, e.error_at, 'subject'::text as viewpoint, e.related_fish_id as other_fish_id, e.linked_entry_id, e.photo_id, e.created_at
      from timeline_entries e
      where e.fish_id = ${fishId} ${kindFilter} ${before(sql`e.occurred_at`, sql`e.id`)}
      order by e.occurred_at desc nulls last, e.id desc nulls last limit ${n})`)
  }
  if (all || kinds.includes('companion')) {
    branches.push(sql`(select e.id, e.kind::text as kind, e.occurred_at, e.author_id, e.imported_author_id, e.data, e.revision, e.entered_in_error, e.error_reason,
        e.error_by_id, e.imported_error_by_id, e.error_at, 'related'::text as viewpoint, e.fish_id as other_fish_id, e.linked_entry_id, e.photo_id, e.created_at
      from timeline_entries e
      where e.related_fish_id = ${fishId} and e.kind = 'companion' and e.fish_id <> ${fishId} ${before(sql`e.occurred_at`, sql`e.id`)}
      order by e.occurred_at desc nulls last, e.id desc nulls last limit ${n})`)
  }
  if (all || kinds.includes('photo')) {
    const at = sql`coalesce(p.taken_at, p.created_at)`
    branches.push(sql`(select p.id, 'photo'::text as kind, ${at} as occurred_at, p.uploader_id as author_id, p.imported_uploader_id as imported_author_id,
        jsonb_build_object('caption', p.caption, 'view', p.view) as data, 1 as revision, false as entered_in_error, null::text as error_reason,
        null::uuid as error_by_id, null::uuid as imported_error_by_id, null::timestamptz as error_at, 'subject'::text as viewpoint, null::uuid as other_fish_id,
        null::uuid as linked_entry_id, p.id as photo_id, p.created_at
      from photos p
      where p.fish_id = ${fishId} and p.state = 'ready' and p.removed_at is null ${before(at, sql`p.id`)}
      order by ${at} desc, p.id desc limit ${n})`)
  }
  if (all || kinds.includes('pond_event')) {
    // Whole-pond events of the ponds this fish has lived in, kept to the moments it lived there (migration 0018).
    branches.push(sql`(select pe.id, 'pond_event'::text as kind, pe.occurred_at, pe.author_id, null::uuid as imported_author_id,
        pe.data || jsonb_build_object('eventKind', pe.kind, 'volumeLitres', pe.volume_litres, 'pondId', pe.pond_id, 'pondName', pond.name) as data,
        1 as revision, pe.entered_in_error, pe.error_reason, pe.error_by_id, null::uuid as imported_error_by_id, pe.error_at, 'subject'::text as viewpoint, null::uuid as other_fish_id,
        null::uuid as linked_entry_id, null::uuid as photo_id, pe.created_at
      from pond_events pe join ponds pond on pond.id = pe.pond_id
      where pe.pond_id in (select f.pond_id from fish f where f.id = ${fishId}
          union select (m.data->'fromPond'->>'id')::uuid from timeline_entries m where m.fish_id = ${fishId} and m.kind = 'move')
        and fintrail_fish_pond_at(${fishId}, pe.occurred_at) = pe.pond_id ${before(sql`pe.occurred_at`, sql`pe.id`)}
      order by pe.occurred_at desc, pe.id desc limit ${n})`)
  }
  if (!branches.length) return null
  return sql`
    select page.*, to_char(page.occurred_at at time zone 'UTC', ${CURSOR_TEXT}) as cursor_at,
      ${AUTHOR_COLUMNS}, other.name as other_fish_name, ${dosesOf(sql`page`)} as doses
    from (${sql.join(branches, sql` union all `)}) page
    ${authorJoins(sql`page`)}
    left join fish other on other.id = page.other_fish_id
    order by page.occurred_at desc nulls last, page.id desc nulls last
    limit ${n}`
}

export interface FactsRow extends Record<string, unknown> {
  enucleations: { entryId: string, on: string, side: string }[]
  problems: { entryId: string, name: string, status: 'active' | 'suspected', onset: string }[]
  treatments: { entryId: string, at: string, data: Record<string, unknown>, authorName: string, authorIsVet: boolean, doses: NonNullable<TimelineRow['doses']> }[]
  last_anaesthesia: { entryId: string, at: string, agent: string, concentrationMgL: number, waterTemperatureC: number | null, inductionMinutes: number | null, recoveryMinutes: number | null } | null
  /** Long: the same threshold as isProlongedRecovery (shared/utils/timeline-derived.ts). */
  anaesthesia_counts: { count: number, longRecoveries: number }
  latest_weight: { entryId: string, at: string, weightG: number } | null
  latest_length: { entryId: string, at: string, lengthCm: number, lengthType: string } | null
  latest_pair: { entryId: string, at: string, weightG: number, lengthCm: number, lengthType: string } | null
  last_exam: { entryId: string, at: string, by: string, reason: string } | null
  companions: { entryId: string, data: Record<string, unknown>, viewpoint: 'subject' | 'related', fishId: string, fishName: string }[]
  death: { entryId: string, at: string, cause: string } | null
}

const UTC_DAY = sql.raw(`'YYYY-MM-DD'`)
const valid = sql.raw('not e.entered_in_error')

/** Everything the profile header shows, in one round trip; every part leaves out entries entered in error. json, not jsonb: it is cheaper to build. */
export function standingFactsSql(fishId: string, today: string, recentFrom: string) {
  return sql<FactsRow>`select
    (select coalesce(json_agg(json_build_object('entryId', e.id, 'on', to_char(e.occurred_at at time zone 'UTC', ${UTC_DAY}), 'side', e.data->>'side')
        order by e.occurred_at), '[]'::json)
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'procedure' and ${valid} and e.data->>'code' = 'enucleation') as enucleations,
    (select coalesce(json_agg(json_build_object('entryId', e.id, 'name', e.data->>'name', 'status', e.data->>'status', 'onset', e.data->>'onset')
        order by e.data->>'status', e.occurred_at desc), '[]'::json)
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'problem' and ${valid} and e.data->>'status' in ('active', 'suspected')) as problems,
    (select coalesce(json_agg(json_build_object('entryId', e.id, 'at', e.occurred_at, 'data', e.data, 'authorName', coalesce(a.name, ia.name),
          -- Read in from an archive: a vet there when the archive was made.
          'authorIsVet', exists (select 1 from memberships m where m.pond_id = e.pond_id and m.user_id = e.author_id and m.role = 'vet') or ia.role = 'vet',
          'doses', ${dosesOf(sql`e`)}) order by e.data->>'startOn' desc), '[]'::json)
      from timeline_entries e left join users a on a.id = e.author_id left join archive_people ia on ia.id = e.imported_author_id
      where e.fish_id = ${fishId} and e.kind = 'treatment' and ${valid} and e.data->>'startOn' <= ${today}
        -- A course that ended in the last week stays while it has missed doses; the exact rule is in the route.
        and coalesce(e.data->>'endOn', to_char((e.data->>'startOn')::date + ((e.data->>'durationDays')::int - 1), ${UTC_DAY}), '9999-12-31') >= ${recentFrom}) as treatments,
    (select json_build_object('entryId', e.id, 'at', e.occurred_at, 'agent', e.data->>'agent', 'concentrationMgL', e.data->'concentrationMgL',
          'waterTemperatureC', e.data->'waterTemperatureC', 'inductionMinutes', e.data->'inductionMinutes', 'recoveryMinutes', e.data->'recoveryMinutes')
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'anaesthesia' and ${valid}
      order by e.occurred_at desc nulls last, e.id desc nulls last limit 1) as last_anaesthesia,
    (select json_build_object('count', count(*),
          'longRecoveries', count(*) filter (where (e.data->>'recoveryMinutes')::float8 > ${PROLONGED_RECOVERY_MINUTES}))
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'anaesthesia' and ${valid}) as anaesthesia_counts,
    (select json_build_object('entryId', e.id, 'at', e.occurred_at, 'weightG', e.data->'weightG')
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'measurement' and ${valid} and e.data ? 'weightG'
      order by e.occurred_at desc nulls last, e.id desc nulls last limit 1) as latest_weight,
    (select json_build_object('entryId', e.id, 'at', e.occurred_at, 'lengthCm', e.data->'lengthCm', 'lengthType', e.data->>'lengthType')
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'measurement' and ${valid} and e.data ? 'lengthCm'
      order by e.occurred_at desc nulls last, e.id desc nulls last limit 1) as latest_length,
    (select json_build_object('entryId', e.id, 'at', e.occurred_at, 'weightG', e.data->'weightG', 'lengthCm', e.data->'lengthCm', 'lengthType', e.data->>'lengthType')
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'measurement' and ${valid} and e.data ? 'weightG' and e.data ? 'lengthCm'
      order by e.occurred_at desc nulls last, e.id desc nulls last limit 1) as latest_pair,
    (select json_build_object('entryId', e.id, 'at', e.occurred_at, 'by', coalesce(u.name, ia.name), 'reason', e.data->>'reason')
      from timeline_entries e left join users u on u.id = e.author_id left join archive_people ia on ia.id = e.imported_author_id
      where e.fish_id = ${fishId} and e.kind = 'exam' and ${valid}
      order by e.occurred_at desc nulls last, e.id desc nulls last limit 1) as last_exam,
    (select coalesce(json_agg(json_build_object('entryId', e.id, 'data', e.data,
          'viewpoint', case when e.fish_id = ${fishId} then 'subject' else 'related' end, 'fishId', o.id, 'fishName', o.name)
        order by e.occurred_at desc), '[]'::json)
      from timeline_entries e
      join fish o on o.id = case when e.fish_id = ${fishId} then e.related_fish_id else e.fish_id end
      -- A companion that has moved to another pond is no longer a standing fact; the separation stays on the timeline.
      where e.kind = 'companion' and ${valid} and (e.fish_id = ${fishId} or e.related_fish_id = ${fishId})
        and o.pond_id = (select f.pond_id from fish f where f.id = ${fishId})) as companions,
    (select json_build_object('entryId', e.id, 'at', e.occurred_at, 'cause', e.data->>'cause')
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'death' and ${valid}
      order by e.occurred_at limit 1) as death`
}

/** A measurement as the growth query sends it: entry id, time in ms since 1970, weight g, length cm, length type. */
export type GrowthPointTuple = [entryId: string, atMs: number, weightG: number | null, lengthCm: number | null, lengthType: string | null]
/**
 * An entry marked on the growth chart's time axis, with the fields its label is made of, and how many entries of its
 * kind it stands for (1, or with a thinned series every entry of that kind in its stretch of time, itself included).
 */
export type GrowthEventTuple = [entryId: string, atMs: number, kind: 'procedure' | 'treatment' | 'death', name: string | null, code: string | null, side: string | null, drug: string | null, route: string | null, standsFor: number]

export interface GrowthRow extends Record<string, unknown> {
  points: GrowthPointTuple[]
  events: GrowthEventTuple[]
  /** Every procedure, treatment and death of the fish, whether marked one by one or not. */
  events_total: number
  companion_deaths: { entryId: string, atMs: number, fishName: string }[]
}

/**
 * Up to this many procedures, treatments and deaths are all marked. Beyond it the fish's marked span is cut into
 * GROWTH_MARKER_STRETCHES equal stretches of time, and each stretch keeps its first procedure and first treatment
 * (standing for the rest of that kind there, counted); deaths are always marked. A chart a phone wide has room for
 * about 17 badges 20 px apart; one procedure and one treatment per stretch stays readable on a wide screen too.
 */
export const GROWTH_MARKERS_IN_FULL = 48
/** The growth statement's names as a prepared statement, one per text (the markers' two forms differ). */
export const GROWTH_STATEMENT_NAMES = { chart: 'growth_chart', all: 'growth_all' } as const
export const GROWTH_MARKER_STRETCHES = 24

// Whole milliseconds since 1970 as a float8 (what a JS Date holds): cheaper to write than a timestamp's text
// or extract()'s numeric. Truncated to the millisecond first, as parsing the timestamp's text did.
const epochMs = (column: string) => sql.raw(`round(date_part('epoch', date_trunc('milliseconds', ${column})) * 1000)`)

/**
 * The measurements for the growth chart, and the entries that matter marked on its time axis. Each row is a
 * JSON array, not an object: a life of weekly weighings is 1,250 rows here, and writing and reading the key
 * names and timestamp texts of each was most of the query's and the route's time (EXPLAIN ANALYZE, --cpu-prof).
 * The markers are thinned here, before any JSON is built (`markers: 'all'` keeps every one): with 625 procedures
 * and 625 treatments, building and sending every marker was most of what was left (EXPLAIN ANALYZE).
 */
export function growthSql(fishId: string, options: { markers?: 'chart' | 'all' } = {}) {
  const markedKinds = sql`e.fish_id = ${fishId} and e.kind in ('procedure', 'treatment', 'death') and ${valid}`
  const labelFields = (alias: string) => sql.raw(`${alias}.data->>'name', ${alias}.data->>'code', ${alias}.data->>'side', ${alias}.data->>'drug', ${alias}.data->>'route'`)
  const events = options.markers === 'all'
    ? sql`(select coalesce(json_agg(json_build_array(e.id, ${epochMs('e.occurred_at')}, e.kind, ${labelFields('e')}, 1) order by e.occurred_at, e.id), '[]'::json)
        from timeline_entries e where ${markedKinds}) as events,
      (select count(*)::int from timeline_entries e where ${markedKinds}) as events_total`
    // Only the kept entries' data is read, by id (`offset 0` keeps it a lookup per kept entry: as a join, the
    // planner hashed the whole table); carried through the windows' sort, the data doubled its time.
    : sql`(select coalesce(json_agg(json_build_array(e.id, ${epochMs('e.occurred_at')}, e.kind, ${labelFields('x')},
          case when e.total <= ${GROWTH_MARKERS_IN_FULL} then 1 else e.stands_for end) order by e.occurred_at, e.id), '[]'::json)
        from stretches e
        cross join lateral (select x.data from timeline_entries x where x.id = e.id offset 0) x
        where e.total <= ${GROWTH_MARKERS_IN_FULL} or e.nth = 1) as events,
      (select count(*)::int from marked) as events_total`
  const stretches = options.markers === 'all'
    ? sql``
    : sql`with marked as (
        select e.id, e.kind, e.occurred_at, count(*) over () as total,
          width_bucket(date_part('epoch', e.occurred_at), date_part('epoch', min(e.occurred_at) over ()),
            date_part('epoch', max(e.occurred_at) over ()) + 1, ${GROWTH_MARKER_STRETCHES}) as stretch
        from timeline_entries e
        where ${markedKinds}),
      stretches as (
        -- A death stands alone: it is never folded into another.
        select m.id, m.kind, m.occurred_at, m.total, row_number() over same as nth, count(*) over same as stands_for
        from marked m
        window same as (partition by m.kind, m.stretch, case when m.kind = 'death' then m.id end order by m.occurred_at, m.id
          rows between unbounded preceding and unbounded following))`
  return sql<GrowthRow>`${stretches}
    select
    (select coalesce(json_agg(json_build_array(e.id, ${epochMs('e.occurred_at')}, e.data->'weightG', e.data->'lengthCm', e.data->>'lengthType')
          order by e.occurred_at, e.id), '[]'::json)
      from timeline_entries e
      where e.fish_id = ${fishId} and e.kind = 'measurement' and ${valid}) as points,
    ${events},
    (select coalesce(json_agg(json_build_object('entryId', d.id, 'atMs', ${epochMs('d.occurred_at')}, 'fishName', o.name) order by d.occurred_at), '[]'::json)
      from (select distinct case when c.fish_id = ${fishId} then c.related_fish_id else c.fish_id end as other_id
            from timeline_entries c
            where c.kind = 'companion' and not c.entered_in_error and (c.fish_id = ${fishId} or c.related_fish_id = ${fishId})) companion
      join fish o on o.id = companion.other_id
      join timeline_entries d on d.fish_id = companion.other_id and d.kind = 'death' and not d.entered_in_error) as companion_deaths`
}

export interface LengthWeightRow extends Record<string, unknown> {
  fish_id: string
  name: string
  species: string
  scientific_name: string
  at: Date
  weight_g: number
  length_cm: number
  length_type: string
}

/** Every weight-and-length pair of the fish now in the pond, for its length–weight chart and fit. */
export function pondLengthWeightSql(pondId: string) {
  return sql<LengthWeightRow>`
    select f.id as fish_id, f.name, f.species, f.scientific_name, e.occurred_at as at, (e.data->>'weightG')::float8 as weight_g,
      (e.data->>'lengthCm')::float8 as length_cm, e.data->>'lengthType' as length_type
    from fish f
    join timeline_entries e on e.fish_id = f.id and e.kind = 'measurement' and not e.entered_in_error
      and e.data ? 'weightG' and e.data ? 'lengthCm'
    where f.pond_id = ${pondId}
    order by f.name, e.occurred_at`
}
