import { and, desc, eq, gt, isNull, or, sql } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'
import { RECOVERABLE_DAYS } from '#shared/utils/photo-limits'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish, role, user, readOnly } = await requireFishRole(event, fishId)
  const cutoff = new Date(Date.now() - RECOVERABLE_DAYS * 86_400_000)
  const rows = await useDb().select({ photo: schema.photos, uploaderName: sql<string>`coalesce(${schema.users.name}, ${schema.archivePeople.name}, '')` })
    .from(schema.photos)
    .leftJoin(schema.users, eq(schema.users.id, schema.photos.uploaderId))
    .leftJoin(schema.archivePeople, eq(schema.archivePeople.id, schema.photos.importedUploaderId))
    .where(and(eq(schema.photos.fishId, fishId), or(isNull(schema.photos.removedAt), gt(schema.photos.removedAt, cutoff))))
    // Newest first by the day the photo was taken, the upload time standing in where the photo has no date.
    .orderBy(desc(sql`coalesce(${schema.photos.takenAt}, ${schema.photos.createdAt})`), desc(schema.photos.createdAt))
  const context = { user, role, profilePhotoId: fish.profilePhotoId }
  // A read-only member sees the photos and no button the server would refuse.
  const items = rows.map(row => toPhotoItem(row.photo, row.uploaderName, context))
    .map(item => (readOnly ? { ...item, canEdit: false, canRemove: false } : item))
  return {
    photos: items.filter(item => !item.removedAt),
    // Removed in the last 30 days and restorable by the caller (their own uploads; all of them for an owner).
    removed: items.filter(item => item.removedAt && item.canRemove),
    canUpload: PHOTO_ADD_ROLES.includes(role) && !readOnly,
    canSetProfile: PROFILE_PHOTO_ROLES.includes(role) && !readOnly,
  }
})
