import { fultonK } from '#shared/utils/condition'
import { eyeState, isCurrentTreatment, isProlongedRecovery, relationWords, treatmentLastDay, type EyeRemoval } from '#shared/utils/timeline-derived'
import { treatmentSchedule } from '#shared/utils/treatment-schedule'
import type { CompanionRelation } from '#shared/utils/timeline-schemas'
import { timelineQuerySchema } from '#shared/utils/timeline-schemas'
import type { FishResidence } from '#shared/utils/custody-schemas'
import { RECOVERABLE_DAYS } from '#shared/utils/photo-limits'
import { and, asc, desc, eq, gt, isNull, or, sql } from 'drizzle-orm'
import type { H3Event } from 'h3'
import { standingFactsSql, timelinePageSql, type FactsRow, type TimelineRow } from '../db/queries/timeline'
import type { FishAccess } from './access'

// What the fish profile's routes answer once access is decided: each route (facts, timeline, residences, photos)
// checks access and calls one of these, and so does the profile's page route (/api/fish/:id/page), which checks
// access once for all of them.

type TreatmentData = {
  drug: string
  route: string
  dose: number
  doseUnit: string
  startOn: string
  durationDays?: number
  endOn?: string
  doseCount?: number
  intervalHours?: number
  firstDoseAt?: string
  instructedBy?: string
  /** Typed text, before vets were chosen from the pond. */
  givenOnInstructionOf?: string
}
// A course that ended lately stays in view while a dose of it was missed.
const MISSED_DOSES_SHOWN_FOR_DAYS = 7

const iso = (at: string) => new Date(at).toISOString()
const dayBefore = (day: string, days: number) => new Date(Date.parse(`${day}T00:00:00Z`) - days * 86_400_000).toISOString().slice(0, 10)

/** Courses running today, and those ended in the last 7 days that still have missed doses. */
function currentTreatments(rows: FactsRow['treatments'], today: string, now: Date) {
  return rows.flatMap((row) => {
    const data = row.data as TreatmentData
    const schedule = treatmentSchedule(data, iso(row.at), row.doses.map(d => ({ ...d, givenAt: iso(d.givenAt) })), now)
    const lastDay = treatmentLastDay(data)
    const recentlyMissed = Boolean(schedule?.missed) && lastDay !== null && lastDay >= dayBefore(today, MISSED_DOSES_SHOWN_FOR_DAYS)
    if (!isCurrentTreatment(data, today) && !recentlyMissed) return []
    return [{
      entryId: row.entryId, drug: data.drug, route: data.route, dose: data.dose, doseUnit: data.doseUnit, startOn: data.startOn, lastDay,
      // The instructing vet, or the vet who wrote it; a name typed before vets were chosen from the pond.
      prescribedBy: data.instructedBy ?? data.givenOnInstructionOf ?? (row.authorIsVet ? row.authorName : null),
      schedule: schedule && {
        doseCount: schedule.doseCount, given: schedule.given, missed: schedule.missed, nextDueAt: schedule.nextDueAt,
        missedDoses: schedule.slots.filter(s => s.state === 'missed').map(s => ({ doseNumber: s.doseNumber, dueAt: s.dueAt })),
      },
    }]
  })
}

/** The key facts of the profile's header (`GET /api/fish/:id/facts`). */
export async function standingFactsOf(fishId: string) {
  const now = new Date()
  const today = now.toISOString().slice(0, 10)
  const { rows: [facts] } = await useDb().execute<FactsRow>(standingFactsSql(fishId, today, dayBefore(today, MISSED_DOSES_SHOWN_FOR_DAYS)))
  const f = facts!
  const last = f.last_anaesthesia
  return {
    eyes: eyeState(f.enucleations as EyeRemoval[]),
    problems: f.problems,
    treatments: currentTreatments(f.treatments, today, now),
    // Not entered in error; `longRecovery` when recovery took over 30 minutes (common practice).
    lastAnaesthesia: last
      ? {
          at: iso(last.at), agent: last.agent, concentrationMgL: last.concentrationMgL, recoveryMinutes: last.recoveryMinutes ?? null,
          longRecovery: isProlongedRecovery(last.recoveryMinutes ?? undefined), entryId: last.entryId,
        }
      : null,
    // Every anaesthesia the fish has had: how many, how many recovered slowly, and the last one's water and induction.
    anaesthesiaHistory: {
      count: f.anaesthesia_counts.count,
      longRecoveries: f.anaesthesia_counts.longRecoveries,
      lastWaterTemperatureC: last?.waterTemperatureC ?? null,
      lastInductionMinutes: last?.inductionMinutes ?? null,
    },
    latestWeight: f.latest_weight && { ...f.latest_weight, at: iso(f.latest_weight.at) },
    latestLength: f.latest_length && { ...f.latest_length, at: iso(f.latest_length.at) },
    // Fulton's K from the latest weighing that has both a weight and a length.
    latestCondition: f.latest_pair && {
      conditionK: fultonK(f.latest_pair.weightG, f.latest_pair.lengthCm) ?? 0, lengthType: f.latest_pair.lengthType,
      at: iso(f.latest_pair.at), entryId: f.latest_pair.entryId,
    },
    lastExam: f.last_exam && { ...f.last_exam, at: iso(f.last_exam.at), reason: f.last_exam.reason ?? '' },
    companions: f.companions.map(c => ({
      entryId: c.entryId,
      fish: { id: c.fishId, name: c.fishName },
      relation: String(c.data.relation),
      words: relationWords(c.data.relation as CompanionRelation, c.data.relationText as string | undefined, c.viewpoint),
    })),
    death: f.death && { ...f.death, at: iso(f.death.at), cause: f.death.cause ?? '' },
  }
}

/** One page of the timeline, newest first (`GET /api/fish/:id/timeline`), for the query in the request. */
export async function timelinePageOf(event: H3Event, { user, role, fish }: FishAccess) {
  const query = await queryValidated(event, timelineQuerySchema)
  const statement = timelinePageSql(fish.id, { kinds: query.kind, cursor: decodeCursor(query.before), limit: query.limit })
  const rows = statement ? (await useDb().execute<TimelineRow>(statement)).rows : []
  const page = rows.slice(0, query.limit)
  const context = { species: fish.species, userId: user.id, role }
  return {
    entries: page.map(row => rowToView(row, context)),
    nextCursor: rows.length > query.limit ? encodeCursor(page.at(-1)!) : null,
  }
}

type PondRef = { id: string, name: string }

/** Where the fish has lived, oldest first, read from its move entries: the first pond from its arrival. */
export async function residencesOf({ user, fish }: FishAccess): Promise<FishResidence[]> {
  const fishId = fish.id
  const moves = await useDb().select({ occurredAt: schema.timelineEntries.occurredAt, data: schema.timelineEntries.data })
    .from(schema.timelineEntries)
    .where(and(eq(schema.timelineEntries.fishId, fishId), eq(schema.timelineEntries.kind, 'move'), eq(schema.timelineEntries.enteredInError, false)))
    .orderBy(asc(schema.timelineEntries.occurredAt), asc(schema.timelineEntries.id))
  const [current] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, fish.pondId))
  const mine = new Set((await listPondsOf(user.id)).map(p => p.id))
  const arrived = fish.acquiredOn ?? fish.createdAt.toISOString().slice(0, 10)
  const stays: { pond: PondRef, from: string, until: string | null }[] = []
  let pond: PondRef = moves.length ? moves[0]!.data.fromPond as PondRef : { id: fish.pondId, name: current!.name }
  let from = arrived
  for (const move of moves) {
    const day = move.occurredAt.toISOString().slice(0, 10)
    stays.push({ pond, from, until: day })
    pond = move.data.toPond as PondRef
    from = day
  }
  stays.push({ pond: { id: fish.pondId, name: current!.name }, from, until: null })
  // Names as they were at the move, but today's name for a pond the caller can still open.
  return stays.map(s => ({
    pondId: s.pond.id, pondName: s.pond.id === fish.pondId ? current!.name : s.pond.name,
    from: s.from, until: s.until, current: s.until === null, visible: mine.has(s.pond.id),
  }))
}

/** The fish's photos, newest first, and what the caller may do with them (`GET /api/fish/:id/photos`). */
export async function photosOf({ fish, role, user, readOnly }: FishAccess) {
  const fishId = fish.id
  const cutoff = new Date(Date.now() - RECOVERABLE_DAYS * 86_400_000)
  const rows = await useDb().select({ photo: schema.photos, uploaderName: sql<string>`coalesce(${schema.users.name}, ${schema.archivePeople.name}, '')` })
    .from(schema.photos)
    .leftJoin(schema.users, eq(schema.users.id, schema.photos.uploaderId))
    .leftJoin(schema.archivePeople, eq(schema.archivePeople.id, schema.photos.importedUploaderId))
    .where(and(eq(schema.photos.fishId, fishId), or(isNull(schema.photos.removedAt), gt(schema.photos.removedAt, cutoff))))
    // Newest first by the day the photo was taken, the upload time standing in where the photo has no date.
    .orderBy(desc(sql`coalesce(${schema.photos.takenAt}, ${schema.photos.createdAt})`), desc(schema.photos.createdAt))
  const context = { user, role, profilePhotoId: fish.profilePhotoId }
  // A read-only member sees the photos and no button the server would refuse.
  const items = rows.map(row => toPhotoItem(row.photo, row.uploaderName, context))
    .map(item => (readOnly ? { ...item, canEdit: false, canRemove: false } : item))
  return {
    photos: items.filter(item => !item.removedAt),
    // Removed in the last 30 days and restorable by the caller (their own uploads; all of them for an owner).
    removed: items.filter(item => item.removedAt && item.canRemove),
    canUpload: PHOTO_ADD_ROLES.includes(role) && !readOnly,
    canSetProfile: PROFILE_PHOTO_ROLES.includes(role) && !readOnly,
  }
}
