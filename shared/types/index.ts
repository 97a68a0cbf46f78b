import type { FISH_SPECIES, FISH_STATUSES, PHOTO_STATES, PHOTO_VIEWS, POND_ROLES, UNIT_SYSTEMS, FISH_SEXES } from '../utils/enums'
import type { AsJson, FishRow, OutgoingMailRow, PondRow, UserRow } from './rows'

export type PondRole = typeof POND_ROLES[number]

export type FishSpecies = typeof FISH_SPECIES[number]
export type FishSex = typeof FISH_SEXES[number]
export type FishStatus = typeof FISH_STATUSES[number]

export type UnitSystem = typeof UNIT_SYSTEMS[number]

export type FieldErrors = Record<string, string[]>

/** The signed-in person; `decimalMark` is how they write decimals, and every number they type is read with it. */
export type CurrentUser = Pick<UserRow, 'id' | 'name' | 'email' | 'units' | 'decimalMark'>

export interface PondSummary extends Pick<PondRow, 'id' | 'name' | 'volumeLitres'> {
  role: PondRole
  fishCount: number
}

export interface FishListItem extends Pick<FishRow, 'id' | 'name' | 'species' | 'scientificName' | 'variety' | 'sex' | 'hatchYear'
  | 'hatchYearEstimated' | 'microchip' | 'status' | 'profilePhotoId'> {
  ageYears: number | null
  /** Where the fish's head is on its profile photo, in percent across and down; null keeps the centre. */
  profileFocus: PhotoFocus | null
  latestWeightG: number | null
  latestLengthCm: number | null
  latestConditionK: number | null
  weightAlert: boolean
}

export type PhotoView = typeof PHOTO_VIEWS[number]
export type PhotoState = typeof PHOTO_STATES[number]

export interface PhotoFocus { x: number, y: number }

/** Where the e-mail announcing an offer stands, shown to its sender with a resend button. */
/** From the outgoing mail row; `lastError` is a plain reason when the last attempt failed (the raw SMTP error stays in the server log). */
export type OfferMailState = AsJson<Pick<OutgoingMailRow, 'status' | 'attempts' | 'lastError' | 'updatedAt'>>
