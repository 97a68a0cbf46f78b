// The fish-list query, kept apart with explicit imports so the benchmark can time the same SQL the route runs.
import { sql } from 'drizzle-orm'
import type { FishListItem } from '../../../shared/types'

export interface FishListQuery { q?: string, sort?: 'name' | 'age' | 'status' | 'condition', dir?: 'asc' | 'desc', status?: string }

export interface FishListRow extends Record<string, unknown> {
  id: string
  name: string
  species: FishListItem['species']
  scientific_name: string
  variety: string
  sex: FishListItem['sex']
  hatch_year: number | null
  hatch_year_estimated: boolean
  microchip: string | null
  status: FishListItem['status']
  profile_photo_id: string | null
  profile_focus_x: number | null
  profile_focus_y: number | null
  weight_g: number | null
  length_cm: number | null
  k_weight_g: number | null
  weight_alert: boolean
}

const ORDER = {
  name: sql`f.name`,
  age: sql`f.hatch_year`,
  status: sql`f.status`,
  condition: sql`s.condition_k`,
}

/**
 * Each fish with its latest measurement, condition factor and weight-loss flag, read from
 * fish_measurement_summary (kept current by a database trigger, see drizzle/0003).
 */
export function fishListSql(pondId: string, query: FishListQuery) {
  const search = query.q ? `%${query.q.replace(/[%_\\]/g, '\\$&')}%` : null
  const chip = query.q ? query.q.replace(/[\s-]/g, '') : ''
  const status = query.status ?? 'all'
  // Age ascending means youngest first, i.e. the latest hatch year first.
  const ascending = (query.dir ?? 'asc') === 'asc'
  const direction = query.sort === 'age' ? (ascending ? sql`desc` : sql`asc`) : (ascending ? sql`asc` : sql`desc`)
  const order = ORDER[query.sort ?? 'name']
  return sql`
    select f.id, f.name, f.species, f.scientific_name, f.variety, f.sex, f.hatch_year, f.hatch_year_estimated,
      f.microchip, f.status, f.profile_photo_id, f.profile_focus_x, f.profile_focus_y, s.weight_g, s.weighed_at, s.length_cm,
      s.condition_weight_g as k_weight_g, coalesce(s.weight_alert, false) as weight_alert
    from fish f
    left join fish_measurement_summary s on s.fish_id = f.id
    where f.pond_id = ${pondId}
      and (${status} = 'all' or f.status::text = ${status})
      and (${search}::text is null or f.name ilike ${search} or f.variety ilike ${search} or (${chip} <> '' and f.microchip like ${chip} || '%'))
    order by ${order} ${direction} nulls last, f.name asc
  `
}
