import type { FISH_SPECIES, FISH_STATUSES, PHOTO_STATES, PHOTO_VIEWS, POND_ROLES, UNIT_SYSTEMS, FISH_SEXES } from '../utils/enums'
import type { AsJson, FishRow, InvitationRow, OutgoingMailRow, PhotoRow, PondRow, UserRow } from './rows'

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

/**
 * A pond as its page reads it. From the row: `volumeMeasurement` (shape, unit, readings; null when the volume
 * was typed as a number), `healthCheckDay` (the yearly check's MM-DD), `waterTestIntervalDays`.
 */
export interface PondDetail extends AsJson<Pick<PondRow, 'id' | 'name' | 'volumeLitres' | 'volumeMeasurement' | 'notes'
  | 'healthCheckDay' | 'waterTestIntervalDays' | 'createdAt' | 'updatedAt'>> {
  role: PondRole
  /** Kept on after a handover to look, not to change: the client hides what the server would refuse. */
  readOnly: boolean
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

export interface FishProfile extends AsJson<Pick<FishRow, 'id' | 'pondId' | 'name' | 'species' | 'scientificName' | 'variety' | 'sex'
  | 'hatchYear' | 'hatchYearEstimated' | 'acquiredOn' | 'acquiredFrom' | 'microchip' | 'features' | 'status' | 'profilePhotoId'
  | 'version' | 'createdAt' | 'updatedAt'>> {
  pondName: string
  role: PondRole
  readOnly: boolean
  ageYears: number | null
  profileFocus: PhotoFocus | null
}

export type PhotoView = typeof PHOTO_VIEWS[number]
export type PhotoState = typeof PHOTO_STATES[number]

/** A photo as the gallery reads it. From the row: `takenAt` is the photo's own EXIF date (the camera's clock), null when it had none. */
export interface PhotoItem extends AsJson<Pick<PhotoRow, 'id' | 'fishId' | 'view' | 'caption' | 'originalName' | 'takenAt' | 'state'
  | 'failureReason' | 'width' | 'height' | 'removedAt'>> {
  uploaderName: string
  uploadedAt: string
  isProfile: boolean
  canEdit: boolean
  canRemove: boolean
  /** When a removed photo is deleted for good. */
  purgeAt: string | null
}

export interface FishPhotos {
  photos: PhotoItem[]
  /** Removed in the last 30 days and restorable by the caller (their own uploads; all of them for an owner). */
  removed: PhotoItem[]
  canUpload: boolean
  canSetProfile: boolean
}

export interface PhotoFocus { x: number, y: number }

/** Where the e-mail announcing an offer stands, shown to its sender with a resend button. */
/** From the outgoing mail row; `lastError` is a plain reason when the last attempt failed (the raw SMTP error stays in the server log). */
export type OfferMailState = AsJson<Pick<OutgoingMailRow, 'status' | 'attempts' | 'lastError' | 'updatedAt'>>

export interface PendingInvitation extends AsJson<Pick<InvitationRow, 'id' | 'email' | 'role' | 'expiresAt' | 'createdAt'>> {
  mail: OfferMailState | null
}
