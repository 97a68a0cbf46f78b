import { fishListSql, type FishListQuery, type FishListRow } from '../db/queries/fish-list'
import type { FishListItem, PondRole } from '#shared/types'
import type { FishRow } from '#shared/types/rows'
import { ageInYears } from '#shared/utils/fish-schemas'
import { fultonK } from '#shared/utils/condition'

const focusOf = (x: number | null, y: number | null) => (x == null || y == null ? null : { x, y })

/** A fish as its profile reads it; `profileFocus` is where the head is on the profile photo (percent across, down), null keeps the centre. */
export function toFishProfile(fish: FishRow, role: PondRole, pondName: string, readOnly = false) {
  return {
    id: fish.id, pondId: fish.pondId, pondName, role, readOnly,
    name: fish.name, species: fish.species, scientificName: fish.scientificName, variety: fish.variety, sex: fish.sex,
    hatchYear: fish.hatchYear, hatchYearEstimated: fish.hatchYearEstimated, ageYears: ageInYears(fish.hatchYear),
    acquiredOn: fish.acquiredOn, acquiredFrom: fish.acquiredFrom, microchip: fish.microchip, features: fish.features,
    status: fish.status, profilePhotoId: fish.profilePhotoId, profileFocus: focusOf(fish.profileFocusX, fish.profileFocusY), version: fish.version,
    createdAt: fish.createdAt.toISOString(), updatedAt: fish.updatedAt.toISOString(),
  }
}

/**
 * The pond's fish with their latest measurement, condition factor and a weight-loss flag.
 */
export async function listFish(pondId: string, query: FishListQuery): Promise<FishListItem[]> {
  const result = await useDb().execute<FishListRow>(fishListSql(pondId, query))
  return result.rows.map(r => ({
    id: r.id, name: r.name, species: r.species, scientificName: r.scientific_name, variety: r.variety, sex: r.sex,
    hatchYear: r.hatch_year, hatchYearEstimated: r.hatch_year_estimated, ageYears: ageInYears(r.hatch_year),
    microchip: r.microchip, status: r.status, profilePhotoId: r.profile_photo_id, profileFocus: focusOf(r.profile_focus_x, r.profile_focus_y),
    latestWeightG: r.weight_g, latestLengthCm: r.length_cm,
    latestConditionK: r.length_cm != null && r.k_weight_g != null ? fultonK(r.k_weight_g, r.length_cm) : null,
    weightAlert: r.weight_alert,
  }))
}
