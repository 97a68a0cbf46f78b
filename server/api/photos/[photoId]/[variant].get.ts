import { z } from 'zod'
import { derivedKey } from '../../../storage/file-storage'

// Only the derived copies are ever served (no metadata in them); the original keeps its GPS position and stays put.
const variantParams = z.object({
  photoId: z.uuid(),
  variant: z.enum(['320.webp', '320.jpg', '1024.webp', '1024.jpg', '2048.webp', '2048.jpg']),
})

export default defineEventHandler(async (event) => {
  const { photoId, variant } = paramsValidated(event, variantParams, 'Photo not found')
  const { photo, user, role } = await requirePhotoAccess(event, photoId)
  // A removed photo stays visible only to those who may bring it back.
  if (photo.state !== 'ready' || (photo.removedAt && !mayRemovePhoto(photo, user, role))) {
    throw createError({ statusCode: 404, statusMessage: 'Photo not found' })
  }
  const storage = useFileStorage()
  const key = derivedKey(photo.id, variant)
  const info = await storage.stat(key).catch((error) => {
    throw createError({ statusCode: 503, statusMessage: 'Storage unavailable', message: storageUnavailableMessage(error) })
  })
  if (!info) throw createError({ statusCode: 404, statusMessage: 'Photo not found' })

  const etag = `"${photo.id.slice(0, 8)}-${variant}-${info.size.toString(36)}-${info.modified.getTime().toString(36)}"`
  setResponseHeaders(event, {
    'ETag': etag,
    // Private: a shared cache must never hand one member's photo to someone else.
    'Cache-Control': 'private, max-age=86400',
    'X-Content-Type-Options': 'nosniff',
    'Cross-Origin-Resource-Policy': 'same-origin',
    'Content-Security-Policy': 'default-src \'none\'; sandbox',
  })
  if (getRequestHeader(event, 'if-none-match') === etag) {
    setResponseStatus(event, 304)
    return null
  }
  setResponseHeaders(event, {
    'Content-Type': variant.endsWith('.webp') ? 'image/webp' : 'image/jpeg',
    'Content-Length': String(info.size),
  })
  return sendStream(event, await storage.read(key))
})
