import { photoIdParams } from '#shared/utils/photo-schemas'

// Makes the derived copies again from the stored original. Safe to press twice: the upload's lock
// lets one run at a time, a ready photo is left alone, and the copies replace each other whole.
export default defineEventHandler(async (event) => {
  const { photoId } = paramsValidated(event, photoIdParams, 'Photo not found')
  const access = await requirePhotoAccess(event, photoId)
  if (!PHOTO_ADD_ROLES.includes(access.role)) throw createError({ statusCode: 403, statusMessage: 'Only members who add photos may retry one' })
  if (access.photo.removedAt) throw createError({ statusCode: 409, statusMessage: 'Removed', message: 'Restore the photo before retrying it' })
  try {
    const outcome = await retryPhoto(access.photo)
    if (outcome === BUSY) setResponseStatus(event, 202)
  }
  catch (error) {
    if (error instanceof PhotoRejection) throw createError({ statusCode: error.status, statusMessage: 'Photo refused', message: error.message })
    throw error
  }
  return photoItemFor(photoId, access)
})
