import { pondIdParams } from '#shared/utils/pond-schemas'
import { fitLengthWeight } from '#shared/utils/condition'
import type { LengthWeightSeries, PondLengthWeight } from '#shared/types/timeline'
import { pondLengthWeightSql, type LengthWeightRow } from '../../../db/queries/timeline'

// Each species gets its own fit: koi and goldfish do not share a length–weight curve,
// and only total lengths are fitted together (a fork length makes the same fish look heavier).
export default defineEventHandler(async (event): Promise<PondLengthWeight> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  const { rows } = await useDb().execute<LengthWeightRow>(pondLengthWeightSql(pondId))
  const bySpecies = new Map<string, Map<string, LengthWeightSeries['fish'][number]>>()
  let otherLengthTypes = 0
  for (const r of rows) {
    if (r.length_type !== 'total') {
      otherLengthTypes++
      continue
    }
    const fishes = bySpecies.get(r.species) ?? bySpecies.set(r.species, new Map()).get(r.species)!
    const one = fishes.get(r.fish_id) ?? fishes.set(r.fish_id, { id: r.fish_id, name: r.name, points: [] }).get(r.fish_id)!
    one.points.push({ lengthCm: r.length_cm, weightG: r.weight_g, at: new Date(r.at).toISOString() })
  }
  const series = [...bySpecies].map(([species, fishes]) => {
    const fish = [...fishes.values()]
    return { species, fish, fit: fitLengthWeight(fish.flatMap(f => f.points)) }
  })
  return { series, otherLengthTypes }
})
