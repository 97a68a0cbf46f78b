import type { ApiResponse } from './api-fetch'

// Names for answers that several components pass around, each read from the route that answers it, so a
// change to a handler reaches every component that shows its data.

/** The profile's key facts. */
export type StandingFacts = ApiResponse<'/api/fish/:fishId/facts'>
export type CurrentTreatment = StandingFacts['treatments'][number]

export type TimelinePage = ApiResponse<'/api/fish/:fishId/timeline'>
export type TimelineEntryView = TimelinePage['entries'][number]

export type TimelineRevisionView = ApiResponse<'/api/timeline/:entryId/revisions'>[number]

export type FishProfile = ApiResponse<'/api/fish/:fishId'>
export type FishPhotos = ApiResponse<'/api/fish/:fishId/photos'>
/** A photo as the gallery reads it. */
export type GalleryPhoto = FishPhotos['photos'][number]

export type PondSummary = ApiResponse<'/api/ponds'>[number]
export type PondDetail = ApiResponse<'/api/ponds/:pondId'>
export type PendingInvitation = ApiResponse<'/api/ponds/:pondId/invitations'>[number]
