import { fishIdParams, growthQuerySchema } from '#shared/utils/fish-schemas'
import { sampleGrowthPoints } from '#shared/utils/growth-sampling'
import { fultonK, weightChangeAlert } from '#shared/utils/condition'
import { growthSql, type GrowthRow } from '../../../db/queries/timeline'

function markerLabel(e: GrowthRow['events'][number]) {
  if (e.kind === 'procedure') return [e.name || e.code?.replaceAll('_', ' '), e.side && e.side !== 'not_applicable' ? `(${e.side})` : ''].filter(Boolean).join(' ')
  if (e.kind === 'treatment') return `${e.drug} (${String(e.route).replace('_', ' ')})`
  return 'Died'
}

/**
 * The growth chart's data; its type is the app's (`ApiResponse<'/api/fish/:fishId/growth'>`). `points` holds every
 * measurement, or with a long history the shape-keeping sample the chart needs (`sampled`; `?points=all` gives
 * all); `totalPoints` counts them all; `markers` are the entries that matter on the time axis; `alerts` are
 * always computed from every weighing.
 */
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish } = await requireFishRole(event, fishId)
  const query = await queryValidated(event, growthQuerySchema)
  const { rows: [row] } = await useDb().execute<GrowthRow>(growthSql(fishId))
  const g = row!
  const points = g.points.map(p => ({
    entryId: p.entryId, at: new Date(p.at).toISOString(), weightG: p.weightG ?? null, lengthCm: p.lengthCm ?? null,
    lengthType: p.lengthType ?? 'total', conditionK: p.weightG != null && p.lengthCm != null ? fultonK(p.weightG, p.lengthCm) : null,
  }))
  const markers = [
    ...g.events.map(e => ({ entryId: e.entryId, at: new Date(e.at).toISOString(), kind: e.kind, label: markerLabel(e) })),
    ...g.companion_deaths.map(d => ({ entryId: d.entryId, at: new Date(d.at).toISOString(), kind: 'companion_death' as const, label: `${d.fishName} died` })),
  ].sort((a, b) => a.at.localeCompare(b.at))
  const weights = points.filter(p => p.weightG != null).map(p => ({ date: p.at, weightG: p.weightG! }))
  const alerts = weightChangeAlert(weights, fish.hatchYear != null ? { hatchYear: fish.hatchYear } : {})
  // A chart a screen wide shows a few hundred points; a life of weekly weighings is sent in full only when asked.
  const shown = query.points === 'all' ? points : sampleGrowthPoints(points)
  return { points: shown, totalPoints: points.length, sampled: shown.length < points.length, markers, alerts }
})
