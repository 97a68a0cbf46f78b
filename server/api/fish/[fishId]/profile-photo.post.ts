import { and, eq, isNull } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'
import { profilePhotoSchema } from '#shared/utils/photo-schemas'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId, PROFILE_PHOTO_ROLES)
  const { photoId, focus } = await readValidated(event, profilePhotoSchema)
  if (photoId) {
    const [photo] = await useDb().select({ id: schema.photos.id, state: schema.photos.state }).from(schema.photos)
      .where(and(eq(schema.photos.id, photoId), eq(schema.photos.fishId, fishId), isNull(schema.photos.removedAt)))
      .limit(1)
    const problem = !photo ? 'This fish has no such photo' : photo.state !== 'ready' ? 'Only a processed photo can be the profile picture' : null
    if (problem) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: problem, data: { fieldErrors: { photoId: [problem] } } })
  }
  // Not a profile edit (no version bump): an open edit form of the fish stays valid.
  await useDb().update(schema.fish).set({ profilePhotoId: photoId, profileFocusX: focus?.x ?? null, profileFocusY: focus?.y ?? null }).where(eq(schema.fish.id, fishId))
  return { profilePhotoId: photoId, profileFocus: focus ?? null }
})
