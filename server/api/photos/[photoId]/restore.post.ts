import { eq } from 'drizzle-orm'
import { photoIdParams } from '#shared/utils/photo-schemas'

export default defineEventHandler(async (event) => {
  const { photoId } = paramsValidated(event, photoIdParams, 'Photo not found')
  const access = await requirePhotoAccess(event, photoId)
  if (!mayRemovePhoto(access.photo, access.user, access.role)) throw createError({ statusCode: 403, statusMessage: 'Only the uploader or an owner may restore this photo' })
  const { removedAt } = access.photo
  if (removedAt && purgeDate(removedAt).getTime() <= Date.now()) {
    throw createError({ statusCode: 410, statusMessage: 'Gone', message: 'This photo was removed more than 30 days ago and is being deleted for good' })
  }
  if (removedAt) {
    try {
      await useDb().update(schema.photos).set({ removedAt: null, removedById: null, updatedAt: new Date() }).where(eq(schema.photos.id, photoId))
    }
    catch (error) {
      const code = ((error as { cause?: { code?: string } }).cause ?? error as { code?: string }).code
      if (code !== '23505') throw error
      throw createError({ statusCode: 409, statusMessage: 'Already there', message: 'The same photo has been uploaded to this fish again since; it is in the gallery already' })
    }
  }
  return photoItemFor(photoId, access)
})
