import type { GalleryPhoto } from '~/utils/api-shapes'
import type { ApiResponse } from '~/utils/api-fetch'
import { formatDay, formatEntryDate } from '~/utils/timeline-labels'

export function useFishPhotos(fishId: MaybeRefOrGetter<string>) {
  return useSavedFetch<ApiResponse<'/api/fish/:fishId/photos'>>(() => `/api/fish/${toValue(fishId)}/photos`, { key: `fish-photos-${toValue(fishId)}` })
}

/** The served sizes of a photo: WebP with a JPEG fallback, 320, 1024 and 2048 px on the long side. */
export function photoSources(photoId: string) {
  const url = (size: number, format: 'webp' | 'jpg') => `/api/photos/${photoId}/${size}.${format}`
  return {
    thumb: url(320, 'webp'),
    webpSet: `${url(320, 'webp')} 320w, ${url(1024, 'webp')} 1024w, ${url(2048, 'webp')} 2048w`,
    jpegSet: `${url(320, 'jpg')} 320w, ${url(1024, 'jpg')} 1024w, ${url(2048, 'jpg')} 2048w`,
    large: url(2048, 'jpg'),
  }
}

/**
 * "Taken 12 May 2024" from the photo's own date, else "Uploaded …", in the reader's date style. The camera
 * writes its wall-clock time with no zone (stored as if UTC), so the taken day is shown as a calendar day.
 */
export function photoDateLabel(photo: Pick<GalleryPhoto, 'takenAt' | 'uploadedAt'>) {
  return photo.takenAt ? `Taken ${formatDay(photo.takenAt.slice(0, 10))}` : `Uploaded ${formatEntryDate(photo.uploadedAt)}`
}

export function formatPhotoDay(iso: string) {
  return formatEntryDate(iso)
}
