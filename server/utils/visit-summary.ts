import { and, asc, eq, inArray } from 'drizzle-orm'
import type { VisitEntryLine, VisitSummary, VisitView, VisitWaterLine } from '#shared/types/pond-care'
import { entryLine } from '#shared/utils/entry-lines'
import { DUE_KIND_LABELS } from '#shared/utils/due'
import { WHOLE_POND_EVENT_LABELS } from '#shared/utils/whole-pond-events'
import { VISIT_PURPOSE_LABELS } from '#shared/utils/visits'
import { WATER_PARAMETER_INFO, WATER_PARAMETERS } from '#shared/utils/water-targets'
import { formatDate, formatDay } from '#shared/utils/dates'
import type { Tx } from './db'

type VisitRow = typeof schema.visits.$inferSelect

export async function visitView(visit: VisitRow, db: Pick<Tx, 'select'> = useDb()): Promise<VisitView> {
  const [vet] = await db.select({ id: schema.users.id, name: schema.users.name }).from(schema.users).where(eq(schema.users.id, visit.vetId))
  const fishSeen = await db.select({ id: schema.fish.id, name: schema.fish.name }).from(schema.visitFish)
    .innerJoin(schema.fish, eq(schema.fish.id, schema.visitFish.fishId))
    .where(eq(schema.visitFish.visitId, visit.id)).orderBy(asc(schema.fish.name))
  return {
    id: visit.id, pondId: visit.pondId, vet: vet!, visitedOn: visit.visitedOn, purpose: visit.purpose, findings: visit.findings,
    openedAt: visit.openedAt.toISOString(), closedAt: visit.closedAt?.toISOString() ?? null, fishSeen,
  }
}

/** The visit of this pond, or 404: a visit is reached only through its pond. */
export async function visitOfPond(pondId: string, visitId: string, db: Pick<Tx, 'select'> = useDb()) {
  const [visit] = await db.select().from(schema.visits).where(and(eq(schema.visits.id, visitId), eq(schema.visits.pondId, pondId)))
  if (!visit) throw createError({ statusCode: 404, statusMessage: 'Visit not found' })
  return visit
}

/** Fish ticked as seen must live in the pond; the list replaces the earlier one. */
export async function setFishSeen(tx: Tx, visit: VisitRow, fishIds: string[]) {
  if (fishIds.length) {
    const found = await tx.select({ id: schema.fish.id }).from(schema.fish).where(and(inArray(schema.fish.id, fishIds), eq(schema.fish.pondId, visit.pondId)))
    if (found.length !== fishIds.length) throw badEntry({ fishSeen: ['Choose fish of this pond'] })
  }
  await tx.delete(schema.visitFish).where(eq(schema.visitFish.visitId, visit.id))
  if (fishIds.length) await tx.insert(schema.visitFish).values(fishIds.map(fishId => ({ visitId: visit.id, fishId })))
}

export async function visitSummary(visit: VisitRow, now: Date): Promise<VisitSummary> {
  const db = useDb()
  const [pond] = await db.select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, visit.pondId))
  const entries = await db.select({
    id: schema.timelineEntries.id, fishId: schema.fish.id, fishName: schema.fish.name, kind: schema.timelineEntries.kind,
    occurredAt: schema.timelineEntries.occurredAt, data: schema.timelineEntries.data, enteredInError: schema.timelineEntries.enteredInError,
  }).from(schema.timelineEntries)
    .innerJoin(schema.fish, eq(schema.fish.id, schema.timelineEntries.fishId))
    .where(eq(schema.timelineEntries.visitId, visit.id))
    .orderBy(asc(schema.fish.name), asc(schema.timelineEntries.occurredAt), asc(schema.timelineEntries.createdAt))
  const lines: VisitEntryLine[] = entries.map(e => ({
    id: e.id, fish: { id: e.fishId, name: e.fishName }, kind: e.kind, occurredAt: e.occurredAt.toISOString(),
    text: entryLine(e.kind, e.data), enteredInError: e.enteredInError,
  }))
  return {
    ...(await visitView(visit)),
    pondName: pond!.name,
    entries: lines,
    pondEvents: await pondEventViews(visit.pondId, { visitId: visit.id }),
    waterTests: await visitWaterLines(visit.pondId, visit.id),
    due: await dueDetails({ pondId: visit.pondId }, now, 90),
  }
}

/** The water tests made during the visit, each reading with its unit and its flag against the pond's targets. */
async function visitWaterLines(pondId: string, visitId: string): Promise<VisitWaterLine[]> {
  const rows = await useDb().select({ test: schema.waterTests, testedByName: schema.users.name }).from(schema.waterTests)
    .innerJoin(schema.users, eq(schema.users.id, schema.waterTests.testedById))
    .where(eq(schema.waterTests.visitId, visitId)).orderBy(asc(schema.waterTests.testedAt))
  if (!rows.length) return []
  const targets = await pondWaterTargets(pondId)
  return rows.map(({ test, testedByName }) => {
    const view = waterTestView(test, testedByName, targets)
    const values = WATER_PARAMETERS.flatMap((parameter) => {
      const value = view[parameter as keyof typeof view]
      if (typeof value !== 'number') return []
      const info = WATER_PARAMETER_INFO[parameter]
      return [{ label: info.label, value: `${value.toFixed(info.decimals)} ${info.unit}`.trim(), flag: view.flags[parameter] ?? null }]
    })
    return { id: test.id, testedAt: test.testedAt.toISOString(), values }
  })
}

/** The e-mail to the owner and keepers when the vet closes the visit. */
export function visitMailText(summary: VisitSummary, link: string) {
  const out: string[] = []
  out.push(`${summary.vet.name} closed the ${VISIT_PURPOSE_LABELS[summary.purpose].toLowerCase()} visit to ${summary.pondName} on ${formatDay(summary.visitedOn)}.`, '')
  out.push('Findings', summary.findings, '')
  out.push(`Fish seen: ${summary.fishSeen.length ? summary.fishSeen.map(f => f.name).join(', ') : 'none ticked'}`, '')
  const valid = summary.entries.filter(e => !e.enteredInError)
  if (valid.length) {
    out.push('What was done')
    for (const e of valid) out.push(`- ${e.fish.name}: ${e.text}`)
    out.push('')
  }
  const events = summary.pondEvents.filter(e => !e.enteredInError)
  if (events.length) {
    out.push('For the whole pond')
    for (const e of events) out.push(`- ${formatDate(e.occurredAt)}: ${WHOLE_POND_EVENT_LABELS[e.kind]}${e.volumeLitres ? ` (pond volume ${e.volumeLitres} L)` : ''}`)
    out.push('')
  }
  if (summary.waterTests.length) {
    out.push('Water')
    for (const w of summary.waterTests) out.push(`- ${formatDate(w.testedAt)}: ${w.values.map(v => `${v.label} ${v.value}${v.flag && v.flag !== 'ok' ? ` (${v.flag.toUpperCase()})` : ''}`).join(', ')}`)
    out.push('')
  }
  out.push('Due next')
  if (summary.due.length) for (const d of summary.due) out.push(`- ${formatDay(d.dueOn)}: ${DUE_KIND_LABELS[d.kind]}${d.fishName ? ` for ${d.fishName}` : ''}${d.overdue ? ' (overdue)' : ''}`)
  else out.push('- Nothing in the next 90 days')
  out.push('', `Open the summary (you can print it): ${link}`, '', 'You receive this because you are an owner or keeper of this pond in Fintrail.')
  return out.join('\n')
}
