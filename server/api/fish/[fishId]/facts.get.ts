import { fishIdParams } from '#shared/utils/fish-schemas'
import { fultonK } from '#shared/utils/condition'
import { eyeState, isCurrentTreatment, isProlongedRecovery, relationWords, treatmentLastDay, type EyeRemoval } from '#shared/utils/timeline-derived'
import { treatmentSchedule } from '#shared/utils/treatment-schedule'
import type { CompanionRelation } from '#shared/utils/timeline-schemas'
import { standingFactsSql, type FactsRow } from '../../../db/queries/timeline'

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

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId)
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
})
