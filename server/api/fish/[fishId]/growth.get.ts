import { fishIdParams, growthQuerySchema } from '#shared/utils/fish-schemas'
import { sampleGrowthPoints } from '#shared/utils/growth-sampling'
import { fultonK, weightChangeAlert } from '#shared/utils/condition'
import { PgDialect } from 'drizzle-orm/pg-core'
import { GROWTH_STATEMENT_NAMES, growthSql, type GrowthEventTuple, type GrowthRow } from '../../../db/queries/timeline'

// Turns the statement into its text and parameters, as drizzle's execute would, for pg's named form.
const dialect = new PgDialect()

function markerLabel([, , kind, name, code, side, drug, route]: GrowthEventTuple) {
  if (kind === 'procedure') return [name || code?.replaceAll('_', ' '), side && side !== 'not_applicable' ? `(${side})` : ''].filter(Boolean).join(' ')
  if (kind === 'treatment') return `${drug} (${String(route).replace('_', ' ')})`
  return 'Died'
}

/**
 * The growth chart's data; its type is the app's (`ApiResponse<'/api/fish/:fishId/growth'>`). `points` holds every
 * measurement, or with a long history the shape-keeping sample the chart needs (`sampled`; `?points=all` gives
 * all); `totalPoints` counts them all; `markers` are the entries that matter on the time axis, with a long
 * history one procedure and one treatment per stretch of time, each `count`ing the entries of its kind it stands for
 * (`markersSampled`; `?markers=all` gives every one, `totalMarkers` counts them); `alerts` are always computed from
 * every weighing.
 */
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish } = await requireFishRole(event, fishId)
  const query = await queryValidated(event, growthQuerySchema)
  const markers = query.markers === 'all' ? 'all' : 'chart'
  // Named, so PostgreSQL plans this long statement once per connection instead of on every request (about 1 ms).
  const statement = dialect.sqlToQuery(growthSql(fishId, { markers }))
  const { rows: [row] } = await usePool().query<GrowthRow>({ name: GROWTH_STATEMENT_NAMES[markers], text: statement.sql, values: statement.params })
  const g = row!
  // The date text is written only for the points sent (`at` stays empty until then; the sampler reads `time`):
  // formatting 1,250 dates to send 150 of them, and parsing them back for the alerts, was a millisecond a request.
  const points = g.points.map(([entryId, atMs, weightG, lengthCm, lengthType]) => ({
    entryId, at: '', time: atMs, weightG: weightG ?? null, lengthCm: lengthCm ?? null,
    lengthType: lengthType ?? 'total', conditionK: weightG != null && lengthCm != null ? fultonK(weightG, lengthCm) : null,
  }))
  // Both lists come in time order; the companions' deaths (a few) are merged in by time, not by a sort of them all.
  const marked: { entryId: string, at: string, kind: GrowthEventTuple[2] | 'companion_death', label: string, count: number, time: number }[] = g.events.map(e => ({ entryId: e[0], at: new Date(e[1]).toISOString(), kind: e[2], label: markerLabel(e), count: e[8], time: e[1] }))
  for (const d of g.companion_deaths) {
    const at = marked.findIndex(m => m.time > d.atMs)
    marked.splice(at < 0 ? marked.length : at, 0, { entryId: d.entryId, at: new Date(d.atMs).toISOString(), kind: 'companion_death', label: `${d.fishName} died`, count: 1, time: d.atMs })
  }
  // Dates, not texts: an alert's from and to are sent as the same ISO texts the points carry.
  const weights = points.filter(p => p.weightG != null).map(p => ({ date: new Date(p.time), weightG: p.weightG! }))
  const alerts = weightChangeAlert(weights, fish.hatchYear != null ? { hatchYear: fish.hatchYear } : {})
  // A chart a screen wide shows a few hundred points; a life of weekly weighings is sent in full only when asked.
  const shown = query.points === 'all' ? points : sampleGrowthPoints(points)
  return {
    points: shown.map(({ entryId, time, weightG, lengthCm, lengthType, conditionK }) => ({ entryId, at: new Date(time).toISOString(), weightG, lengthCm, lengthType, conditionK })),
    totalPoints: points.length,
    sampled: shown.length < points.length,
    markers: marked.map(({ time: _, ...m }) => m),
    totalMarkers: g.events_total + g.companion_deaths.length,
    markersSampled: g.events.length < g.events_total,
    alerts,
  }
})
