import type { FishPhotos, PhotoItem } from '#shared/types'

export function useFishPhotos(fishId: MaybeRefOrGetter<string>) {
  return useFetch<FishPhotos>(() => `/api/fish/${toValue(fishId)}/photos`, { key: `fish-photos-${toValue(fishId)}` })
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

const DAY = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' })

/** "Taken 12 May 2024" from the photo's own date, else "Uploaded …". UTC on both sides, so server and browser agree. */
export function photoDateLabel(photo: Pick<PhotoItem, 'takenAt' | 'uploadedAt'>) {
  return photo.takenAt ? `Taken ${DAY.format(new Date(photo.takenAt))}` : `Uploaded ${DAY.format(new Date(photo.uploadedAt))}`
}

export function formatPhotoDay(iso: string) {
  return DAY.format(new Date(iso))
}
