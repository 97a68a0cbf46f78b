import { eq } from 'drizzle-orm'
import { photoIdParams } from '#shared/utils/photo-schemas'

// Removing only hides the photo: it can be restored for 30 days, then the hourly purge deletes it.
export default defineEventHandler(async (event) => {
  const { photoId } = paramsValidated(event, photoIdParams, 'Photo not found')
  const access = await requirePhotoAccess(event, photoId)
  if (!mayRemovePhoto(access.photo, access.user, access.role)) throw createError({ statusCode: 403, statusMessage: 'Only the uploader or an owner may remove this photo' })
  if (!access.photo.removedAt) {
    await useDb().update(schema.photos).set({ removedAt: new Date(), removedById: access.user.id, updatedAt: new Date() })
      .where(eq(schema.photos.id, photoId))
    if (access.fish.profilePhotoId === photoId) await replaceProfilePhoto(access.fish.id, photoId)
  }
  return photoItemFor(photoId, access)
})
