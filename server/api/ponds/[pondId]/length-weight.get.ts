import { pondIdParams } from '#shared/utils/pond-schemas'
import { fitLatestPerFish } from '#shared/utils/condition'
import { pondLengthWeightSql, type LengthWeightRow } from '../../../db/queries/timeline'

// Each species (by scientific name) gets its own fit, from one point per fish: its latest weighing with a
// total length (a fork length makes the same fish look heavier). The chart still shows every weighing.
// Fits are grouped by scientific name (two "other" species never share a curve); a fit with b outside 2.5-3.5
// is flagged (Froese 2006). `otherLengthTypes` counts the measurements left out for not being total length.
interface FishPoints { id: string, name: string, points: { lengthCm: number, weightG: number, at: string }[] }

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  const { rows } = await useDb().execute<LengthWeightRow>(pondLengthWeightSql(pondId))
  const bySpecies = new Map<string, { species: string, scientificName: string, fish: Map<string, FishPoints> }>()
  let otherLengthTypes = 0
  for (const r of rows) {
    if (r.length_type !== 'total') {
      otherLengthTypes++
      continue
    }
    const key = r.scientific_name.trim().toLowerCase() || r.species
    const group = bySpecies.get(key) ?? bySpecies.set(key, { species: r.species, scientificName: r.scientific_name, fish: new Map() }).get(key)!
    const one = group.fish.get(r.fish_id) ?? group.fish.set(r.fish_id, { id: r.fish_id, name: r.name, points: [] }).get(r.fish_id)!
    one.points.push({ lengthCm: r.length_cm, weightG: r.weight_g, at: new Date(r.at).toISOString() })
  }
  const series = [...bySpecies.values()].map(({ species, scientificName, fish }) => {
    const list = [...fish.values()]
    return { species, scientificName, fish: list, fit: fitLatestPerFish(list) }
  })
  return { series, otherLengthTypes }
})
