import type { DecimalMark } from '../utils/decimal'
import type { PondVolumeMeasurement } from '../utils/pond-volume-schemas'
import type { FISH_SPECIES, FISH_STATUSES, OUTGOING_MAIL_STATUSES, PHOTO_STATES, PHOTO_VIEWS, POND_ROLES, UNIT_SYSTEMS, FISH_SEXES } from '../utils/enums'

export type PondRole = typeof POND_ROLES[number]

export type FishSpecies = typeof FISH_SPECIES[number]
export type FishSex = typeof FISH_SEXES[number]
export type FishStatus = typeof FISH_STATUSES[number]

export type UnitSystem = typeof UNIT_SYSTEMS[number]

export type FieldErrors = Record<string, string[]>

export interface CurrentUser {
  id: string
  name: string
  email: string
  units: UnitSystem
  /** How this person writes decimals; every number they type is read with it. */
  decimalMark: DecimalMark
}

export interface PondSummary {
  id: string
  name: string
  role: PondRole
  volumeLitres: number | null
  fishCount: number
}

export interface PondDetail {
  id: string
  name: string
  volumeLitres: number | null
  /** How the volume was measured (shape, unit, readings); null when it was typed as a number. */
  volumeMeasurement: PondVolumeMeasurement | null
  notes: string
  /** The yearly health check's month and day (MM-DD). */
  healthCheckDay: string
  waterTestIntervalDays: number
  role: PondRole
  /** Kept on after a handover to look, not to change: the client hides what the server would refuse. */
  readOnly: boolean
  fishCount: number
  createdAt: string
  updatedAt: string
}

export interface FishListItem {
  id: string
  name: string
  species: FishSpecies
  scientificName: string
  variety: string
  sex: string
  hatchYear: number | null
  hatchYearEstimated: boolean
  ageYears: number | null
  microchip: string | null
  status: FishStatus
  profilePhotoId: string | null
  /** Where the fish's head is on its profile photo, in percent across and down; null keeps the centre. */
  profileFocus: PhotoFocus | null
  latestWeightG: number | null
  latestLengthCm: number | null
  latestConditionK: number | null
  weightAlert: boolean
}

export interface FishProfile {
  id: string
  pondId: string
  pondName: string
  role: PondRole
  readOnly: boolean
  name: string
  species: FishSpecies
  scientificName: string
  variety: string
  sex: FishSex
  hatchYear: number | null
  hatchYearEstimated: boolean
  ageYears: number | null
  acquiredOn: string | null
  acquiredFrom: string
  microchip: string | null
  features: string
  status: FishStatus
  profilePhotoId: string | null
  profileFocus: PhotoFocus | null
  version: number
  createdAt: string
  updatedAt: string
}

export interface FishEditRecord {
  id: string
  at: string
  by: string
  changes: { field: string, from: unknown, to: unknown }[]
}

export type PhotoView = typeof PHOTO_VIEWS[number]
export type PhotoState = typeof PHOTO_STATES[number]

export interface PhotoItem {
  id: string
  fishId: string
  uploaderName: string
  view: PhotoView
  caption: string
  originalName: string
  /** From the photo's own EXIF date (the camera's clock), null when it had none. */
  takenAt: string | null
  uploadedAt: string
  state: PhotoState
  failureReason: string | null
  width: number | null
  height: number | null
  isProfile: boolean
  canEdit: boolean
  canRemove: boolean
  removedAt: string | null
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
export interface OfferMailState {
  status: typeof OUTGOING_MAIL_STATUSES[number]
  attempts: number
  /** A plain reason when the last attempt failed; the raw SMTP error stays in the server log. */
  lastError: string | null
  updatedAt: string
}

export interface PendingInvitation {
  id: string
  email: string
  role: PondRole
  expiresAt: string
  createdAt: string
  mail: OfferMailState | null
}
