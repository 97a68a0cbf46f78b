import { eq, sql } from 'drizzle-orm'
import type { CurrentUser, PondRole } from '#shared/types'
import { RECOVERABLE_DAYS } from '#shared/utils/photo-limits'
import type { PhotoAccess } from './access'
import type { PhotoRow } from '#shared/types/rows'

// Owners photograph their fish, keepers record photos, vets photograph at exams.
export const PHOTO_ADD_ROLES: readonly PondRole[] = ['owner', 'keeper', 'vet']

export function mayRemovePhoto(photo: Pick<PhotoRow, 'uploaderId'>, user: CurrentUser, role: PondRole) {
  return role === 'owner' || photo.uploaderId === user.id
}

/** View and caption: the uploader, and those who look after the fish's record (owner, keeper). */
export function mayEditPhoto(photo: Pick<PhotoRow, 'uploaderId'>, user: CurrentUser, role: PondRole) {
  return role === 'owner' || role === 'keeper' || photo.uploaderId === user.id
}

export function purgeDate(removedAt: Date) {
  return new Date(removedAt.getTime() + RECOVERABLE_DAYS * 86_400_000)
}

export function toPhotoItem(photo: PhotoRow, uploaderName: string, context: { user: CurrentUser, role: PondRole, profilePhotoId: string | null }) {
  return {
    id: photo.id,
    fishId: photo.fishId,
    uploaderName,
    view: photo.view,
    caption: photo.caption,
    originalName: photo.originalName,
    // The photo's own EXIF date (the camera's clock), null when it had none.
    takenAt: photo.takenAt?.toISOString() ?? null,
    uploadedAt: photo.createdAt.toISOString(),
    state: photo.state,
    failureReason: photo.failureReason,
    width: photo.width,
    height: photo.height,
    isProfile: context.profilePhotoId === photo.id,
    canEdit: mayEditPhoto(photo, context.user, context.role),
    canRemove: mayRemovePhoto(photo, context.user, context.role),
    removedAt: photo.removedAt?.toISOString() ?? null,
    // When a removed photo is deleted for good.
    purgeAt: photo.removedAt ? purgeDate(photo.removedAt).toISOString() : null,
  }
}

/** The answer of a photo route: the row as the caller sees it, with the fish's current profile choice. */
export async function photoItemFor(photoId: string, access: Pick<PhotoAccess, 'user' | 'role'>) {
  const [row] = await useDb().select({ photo: schema.photos, uploaderName: sql<string>`coalesce(${schema.users.name}, ${schema.archivePeople.name}, '')`, profilePhotoId: schema.fish.profilePhotoId })
    .from(schema.photos)
    .leftJoin(schema.users, eq(schema.users.id, schema.photos.uploaderId))
    .leftJoin(schema.archivePeople, eq(schema.archivePeople.id, schema.photos.importedUploaderId))
    .innerJoin(schema.fish, eq(schema.fish.id, schema.photos.fishId))
    .where(eq(schema.photos.id, photoId))
    .limit(1)
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Photo not found' })
  return toPhotoItem(row.photo, row.uploaderName, { ...access, profilePhotoId: row.profilePhotoId })
}
