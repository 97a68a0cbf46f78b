import { sql } from 'drizzle-orm'
import type { DueItem, DueItemDetail } from '#shared/types/pond-care'
import { DUE_HORIZON_DAYS, addDays, dayOf, isOverdue, nextHealthCheck, nextWaterTest, type DueKind } from '#shared/utils/due'
import { treatmentSchedule } from '#shared/utils/treatment-schedule'

interface PondFacts extends Record<string, unknown> {
  pond_id: string
  pond_name: string
  health_check_day: string
  water_test_interval_days: number
  since: string
  last_check_on: string | null
  last_water_test_on: string | null
}

interface RecheckRow extends Record<string, unknown> {
  pond_id: string
  entry_id: string
  fish_id: string
  fish_name: string
  kind: 'procedure' | 'treatment'
  what: string
  due_on: string
}

interface CourseRow extends Record<string, unknown> {
  pond_id: string
  entry_id: string
  fish_id: string
  fish_name: string
  occurred_at: Date
  data: Record<string, unknown>
  doses: { doseNumber: number, givenAt: string }[]
}

// The ponds a person works in: read-only members (kept on after a handover) only look back.
const activePonds = (userId: string) => sql`select m.pond_id from memberships m where m.user_id = ${userId} and not m.read_only`

/**
 * Everything due in the given ponds as of `now`, soonest first, then by pond. A recheck is the date
 * set on a procedure or treatment of a fish still living in the pond; it is done once the fish has
 * an exam on a later day than the entry that asked for it.
 */
export async function dueDetails(ponds: { userId: string } | { pondId: string }, now: Date, horizonDays: number | null = DUE_HORIZON_DAYS): Promise<DueItemDetail[]> {
  const today = dayOf(now)
  const pondFilter = 'userId' in ponds ? sql`p.id in (${activePonds(ponds.userId)})` : sql`p.id = ${ponds.pondId}`
  const db = useDb()
  const facts = (await db.execute<PondFacts>(sql`
    select p.id as pond_id, p.name as pond_name, p.health_check_day, p.water_test_interval_days,
      to_char(p.created_at at time zone 'UTC', 'YYYY-MM-DD') as since,
      (select to_char(max(v.visited_on), 'YYYY-MM-DD') from visits v where v.pond_id = p.id and v.purpose = 'health_check' and v.visited_on <= ${today}::date) as last_check_on,
      ${lastWaterTestSql(now)} as last_water_test_on
    from ponds p where ${pondFilter}`)).rows
  const rechecks = (await db.execute<RecheckRow>(sql`
    select p.id as pond_id, e.id as entry_id, f.id as fish_id, f.name as fish_name, e.kind::text as kind,
      coalesce(nullif(e.data->>'name', ''), replace(e.data->>'code', '_', ' '), e.data->>'drug', '') as what, e.data->>'recheckOn' as due_on
    from ponds p
    join fish f on f.pond_id = p.id and f.status = 'alive'
    join timeline_entries e on e.fish_id = f.id and e.kind in ('procedure', 'treatment') and not e.entered_in_error and e.data ? 'recheckOn'
    where ${pondFilter}
      and not exists (select 1 from timeline_entries x where x.fish_id = f.id and x.kind = 'exam' and not x.entered_in_error
        and (x.occurred_at at time zone 'UTC')::date > (e.occurred_at at time zone 'UTC')::date)`)).rows

  // Scheduled courses of living fish: the next dose not yet given (the schedule is clinical's, shared/utils/treatment-schedule.ts).
  const courses = (await db.execute<CourseRow>(sql`
    select p.id as pond_id, e.id as entry_id, f.id as fish_id, f.name as fish_name, e.occurred_at, e.data,
      (select coalesce(json_agg(json_build_object('doseNumber', d.dose_number, 'givenAt', d.given_at)), '[]'::json)
        from treatment_doses d where d.entry_id = e.id) as doses
    from ponds p
    join fish f on f.pond_id = p.id and f.status = 'alive'
    join timeline_entries e on e.fish_id = f.id and e.kind = 'treatment' and not e.entered_in_error and e.data ? 'doseCount'
    where ${pondFilter}`)).rows
  const doses = courses.flatMap((c) => {
    const schedule = treatmentSchedule(c.data, new Date(c.occurred_at).toISOString(),
      c.doses.map(d => ({ doseNumber: d.doseNumber, givenAt: new Date(d.givenAt).toISOString(), givenBy: null, note: '' })), now)
    const next = schedule?.slots.find(s => s.state === 'due')
    if (!schedule || !next) return []
    const missed = schedule.missed ? `, ${schedule.missed} missed` : ''
    return [{ course: c, dueOn: dayOf(new Date(next.dueAt)), about: `dose ${next.doseNumber} of ${schedule.doseCount} of ${String(c.data.drug ?? 'the treatment')}${missed}` }]
  })
  const names = new Map(facts.map(f => [f.pond_id, f.pond_name]))
  const item = (pondId: string, kind: DueKind, dueOn: string, extra: Partial<DueItemDetail> = {}): DueItemDetail => ({
    pondId, pondName: names.get(pondId) ?? '', kind, dueOn, overdue: isOverdue(dueOn, today), fishId: null, fishName: null, entryId: null, about: '', ...extra,
  })
  const items: DueItemDetail[] = [
    ...facts.map(f => item(f.pond_id, 'health_check', nextHealthCheck(f.health_check_day, f.last_check_on, f.since), {
      about: f.last_check_on ? `last on ${f.last_check_on}` : 'none recorded yet',
    })),
    ...facts.map(f => item(f.pond_id, 'water_test', nextWaterTest(f.water_test_interval_days, f.last_water_test_on, f.since), {
      about: f.last_water_test_on ? `every ${f.water_test_interval_days} days, last on ${f.last_water_test_on}` : `every ${f.water_test_interval_days} days, none recorded yet`,
    })),
    ...doses.map(d => item(d.course.pond_id, 'treatment_dose', d.dueOn, { fishId: d.course.fish_id, fishName: d.course.fish_name, entryId: d.course.entry_id, about: d.about })),
    ...rechecks.map(r => item(r.pond_id, 'recheck', r.due_on, { fishId: r.fish_id, fishName: r.fish_name, entryId: r.entry_id, about: `after ${r.kind === 'procedure' ? 'the procedure' : 'the treatment'}${r.what ? ` (${r.what})` : ''}` })),
  ]
  const horizon = horizonDays === null ? null : addDays(today, horizonDays)
  return items
    .filter(i => horizon === null || i.dueOn <= horizon)
    .sort((a, b) => a.dueOn.localeCompare(b.dueOn) || a.pondName.localeCompare(b.pondName) || a.pondId.localeCompare(b.pondId) || (a.fishName ?? '').localeCompare(b.fishName ?? ''))
}

/** The answer of GET /api/due: exactly these fields, `fishId` only where the item is about one fish. */
export function dueItemOf(detail: DueItemDetail): DueItem {
  return {
    pondId: detail.pondId, pondName: detail.pondName, ...(detail.fishId ? { fishId: detail.fishId } : {}),
    kind: detail.kind, dueOn: detail.dueOn, overdue: detail.overdue,
  }
}

// The last test up to the clock's moment (a test's clock may lie in the past of the tests already recorded).
const lastWaterTestSql = (now: Date) => sql`(select to_char(max(w.tested_at) at time zone 'UTC', 'YYYY-MM-DD') from water_tests w
  where w.pond_id = p.id and w.tested_at <= ${now.toISOString()}::timestamptz)`
