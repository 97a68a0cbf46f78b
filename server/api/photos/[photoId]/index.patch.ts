import { eq } from 'drizzle-orm'
import { photoIdParams, photoUpdateSchema } from '#shared/utils/photo-schemas'

export default defineEventHandler(async (event) => {
  const { photoId } = paramsValidated(event, photoIdParams, 'Photo not found')
  const access = await requirePhotoAccess(event, photoId)
  if (!mayEditPhoto(access.photo, access.user, access.role)) throw createError({ statusCode: 403, statusMessage: 'Only the uploader, a keeper or an owner may change this photo' })
  if (access.photo.removedAt) throw createError({ statusCode: 409, statusMessage: 'Removed', message: 'Restore the photo before changing it' })
  const input = await readValidated(event, photoUpdateSchema)
  const [updated] = await useDb().update(schema.photos).set({ ...input, updatedAt: new Date() }).where(eq(schema.photos.id, photoId)).returning()
  // Marked as taken from above: it becomes a reference photo for "which fish is this?".
  if (updated && input.view === 'top' && access.photo.view !== 'top') await queuePhotoFeatures(updated)
  return photoItemFor(photoId, access)
})
