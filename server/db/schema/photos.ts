import { sql } from 'drizzle-orm'
import { customType, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid, varchar } from 'drizzle-orm/pg-core'
import { PHOTO_STATES, PHOTO_VIEWS } from '../../../shared/utils/enums'
import { fish } from './fish'
import { users } from './users'

export const photoView = pgEnum('photo_view', PHOTO_VIEWS)
export const photoState = pgEnum('photo_state', PHOTO_STATES)

export type PhotoVariant = { longSide: number, width: number, height: number, format: 'webp' | 'jpeg', bytes: number }

export const photos = pgTable('photos', {
  id: uuid('id').primaryKey().defaultRandom(),
  fishId: uuid('fish_id').notNull().references(() => fish.id),
  uploaderId: uuid('uploader_id').notNull().references(() => users.id),
  // The tus upload id: a retried finish hook finds the same row instead of adding a second one.
  uploadId: varchar('upload_id', { length: 80 }).notNull().unique(),
  originalName: varchar('original_name', { length: 255 }).notNull().default(''),
  view: photoView('view').notNull().default('other'),
  caption: varchar('caption', { length: 300 }).notNull().default(''),
  takenAt: timestamp('taken_at', { withTimezone: true }),
  state: photoState('state').notNull().default('pending'),
  failureReason: text('failure_reason'),
  mime: varchar('mime', { length: 40 }),
  width: integer('width'),
  height: integer('height'),
  bytes: integer('bytes'),
  sha256: varchar('sha256', { length: 64 }),
  variants: jsonb('variants').$type<PhotoVariant[]>().notNull().default([]),
  removedAt: timestamp('removed_at', { withTimezone: true }),
  removedById: uuid('removed_by_id').references(() => users.id),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('photos_fish_idx').on(t.fishId, t.createdAt),
  index('photos_uploader_idx').on(t.uploaderId),
  index('photos_removed_by_idx').on(t.removedById),
  // The same bytes twice on one fish are one photo: a client that re-sends a finished upload gets the first back.
  uniqueIndex('photos_fish_sha256_live_unique').on(t.fishId, t.sha256).where(sql`${t.removedAt} is null and ${t.sha256} is not null`),
  index('photos_removed_at_idx').on(t.removedAt).where(sql`${t.removedAt} is not null`),
])

const bytea = customType<{ data: Buffer, driverData: Buffer }>({ dataType: () => 'bytea' })

/**
 * What "Which fish is this?" compares, computed once when a photo from above becomes ready
 * (server/fish-id/features.ts): keypoints and the colour-patch layout, packed in one value.
 * Goes with its photo when the photo is deleted for good.
 */
export const photoFeatures = pgTable('photo_features', {
  photoId: uuid('photo_id').primaryKey().references(() => photos.id, { onDelete: 'cascade' }),
  // Features of an older method version are computed again before use.
  version: integer('version').notNull(),
  features: bytea('features').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
})
