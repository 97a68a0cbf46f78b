import { sql } from 'drizzle-orm'
import type { FishListItem, FishProfile, PondRole } from '#shared/types'
import { ageInYears } from '#shared/utils/fish-schemas'
import { fultonK } from '#shared/utils/condition'

type FishRow = typeof schema.fish.$inferSelect

export function toFishProfile(fish: FishRow, role: PondRole, pondName: string): FishProfile {
  return {
    id: fish.id, pondId: fish.pondId, pondName, role,
    name: fish.name, species: fish.species, scientificName: fish.scientificName, variety: fish.variety, sex: fish.sex,
    hatchYear: fish.hatchYear, hatchYearEstimated: fish.hatchYearEstimated, ageYears: ageInYears(fish.hatchYear),
    acquiredOn: fish.acquiredOn, acquiredFrom: fish.acquiredFrom, microchip: fish.microchip, features: fish.features,
    status: fish.status, profilePhotoId: fish.profilePhotoId, version: fish.version,
    createdAt: fish.createdAt.toISOString(), updatedAt: fish.updatedAt.toISOString(),
  }
}

interface FishListRow extends Record<string, unknown> {
  id: string
  name: string
  species: FishListItem['species']
  scientific_name: string
  variety: string
  sex: string
  hatch_year: number | null
  hatch_year_estimated: boolean
  microchip: string | null
  status: FishListItem['status']
  profile_photo_id: string | null
  weight_g: number | null
  length_cm: number | null
  k_weight_g: number | null
  weight_alert: boolean
}

export interface FishListQuery { q?: string, sort?: 'name' | 'age' | 'status' | 'condition', dir?: 'asc' | 'desc', status?: string }

const ORDER = {
  name: sql`f.name`,
  age: sql`f.hatch_year`,
  status: sql`f.status`,
  condition: sql`k.condition_k`,
}

/**
 * The pond's fish with their latest measurement, condition factor and a weight-loss flag
 * (10 % or more below the highest weight of the 90 days before the latest one; common practice).
 */
export async function listFish(pondId: string, query: FishListQuery): Promise<FishListItem[]> {
  const search = query.q ? `%${query.q.replace(/[%_\\]/g, '\\$&')}%` : null
  const chip = query.q ? query.q.replace(/[\s-]/g, '') : ''
  const status = query.status ?? 'all'
  // Age ascending means youngest first, i.e. the latest hatch year first.
  const ascending = (query.dir ?? 'asc') === 'asc'
  const direction = query.sort === 'age' ? (ascending ? sql`desc` : sql`asc`) : (ascending ? sql`asc` : sql`desc`)
  const order = ORDER[query.sort ?? 'name']
  const result = await useDb().execute<FishListRow>(sql`
    select f.id, f.name, f.species, f.scientific_name, f.variety, f.sex, f.hatch_year, f.hatch_year_estimated,
      f.microchip, f.status, f.profile_photo_id, w.weight_g, w.occurred_at as weighed_at, k.length_cm, k.condition_k,
      coalesce(w.weight_g < 0.9 * w.recent_max, false) as weight_alert
    from fish f
    left join lateral (
      select (e.data->>'weightG')::float8 as weight_g, e.occurred_at,
        (select max((p.data->>'weightG')::float8) from timeline_entries p
          where p.fish_id = f.id and p.kind = 'measurement' and not p.entered_in_error and p.data ? 'weightG'
            and p.occurred_at between e.occurred_at - interval '90 days' and e.occurred_at) as recent_max
      from timeline_entries e
      where e.fish_id = f.id and e.kind = 'measurement' and not e.entered_in_error and e.data ? 'weightG'
      order by e.occurred_at desc limit 1
    ) w on true
    left join lateral (
      select (e.data->>'lengthCm')::float8 as length_cm, (e.data->>'weightG')::float8 as k_weight_g,
        100 * (e.data->>'weightG')::float8 / power((e.data->>'lengthCm')::float8, 3) as condition_k
      from timeline_entries e
      where e.fish_id = f.id and e.kind = 'measurement' and not e.entered_in_error and e.data ? 'weightG' and e.data ? 'lengthCm'
      order by e.occurred_at desc limit 1
    ) k on true
    where f.pond_id = ${pondId}
      and (${status} = 'all' or f.status::text = ${status})
      and (${search}::text is null or f.name ilike ${search} or f.variety ilike ${search} or (${chip} <> '' and f.microchip like ${chip} || '%'))
    order by ${order} ${direction} nulls last, f.name asc
  `)
  return result.rows.map(r => ({
    id: r.id, name: r.name, species: r.species, scientificName: r.scientific_name, variety: r.variety, sex: r.sex,
    hatchYear: r.hatch_year, hatchYearEstimated: r.hatch_year_estimated, ageYears: ageInYears(r.hatch_year),
    microchip: r.microchip, status: r.status, profilePhotoId: r.profile_photo_id,
    latestWeightG: r.weight_g, latestLengthCm: r.length_cm,
    latestConditionK: r.length_cm != null && r.k_weight_g != null ? fultonK(r.k_weight_g, r.length_cm) : null,
    weightAlert: r.weight_alert,
  }))
}
