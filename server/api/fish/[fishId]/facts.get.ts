import { fishIdParams } from '#shared/utils/fish-schemas'
import { fultonK } from '#shared/utils/condition'
import type { StandingFacts } from '#shared/types/timeline'
import { eyeState, isCurrentTreatment, relationWords, treatmentLastDay, type EyeRemoval } from '#shared/utils/timeline-derived'
import type { CompanionRelation } from '#shared/utils/timeline-schemas'
import { standingFactsSql, type FactsRow } from '../../../db/queries/timeline'

type TreatmentData = { drug: string, route: string, dose: number, doseUnit: string, startOn: string, durationDays?: number, endOn?: string }

export default defineEventHandler(async (event): Promise<StandingFacts> => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId)
  const today = new Date().toISOString().slice(0, 10)
  const { rows: [facts] } = await useDb().execute<FactsRow>(standingFactsSql(fishId, today))
  const f = facts!
  const iso = (at: string) => new Date(at).toISOString()
  return {
    eyes: eyeState(f.enucleations as EyeRemoval[]),
    problems: f.problems,
    treatments: f.treatments
      .map(t => ({ entryId: t.entryId, data: t.data as TreatmentData }))
      .filter(t => isCurrentTreatment(t.data, today))
      .map(({ entryId, data }) => ({ entryId, drug: data.drug, route: data.route, dose: data.dose, doseUnit: data.doseUnit, startOn: data.startOn, lastDay: treatmentLastDay(data) })),
    latestWeight: f.latest_weight && { ...f.latest_weight, at: iso(f.latest_weight.at) },
    latestLength: f.latest_length && { ...f.latest_length, at: iso(f.latest_length.at) },
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
