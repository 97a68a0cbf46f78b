import { boolean, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import { STORED_TIMELINE_KINDS } from '../../../shared/utils/enums'
import { fish } from './fish'
import { ponds } from './ponds'
import { users } from './users'
import { photos } from './photos'
import { visits } from './pond-care'

export const timelineKind = pgEnum('timeline_kind', STORED_TIMELINE_KINDS)

export const timelineEntries = pgTable('timeline_entries', {
  id: uuid('id').primaryKey().defaultRandom(),
  fishId: uuid('fish_id').notNull().references(() => fish.id),
  // The pond the fish lived in when this happened; history keeps it after a move.
  pondId: uuid('pond_id').notNull().references(() => ponds.id),
  kind: timelineKind('kind').notNull(),
  occurredAt: timestamp('occurred_at', { withTimezone: true }).notNull(),
  authorId: uuid('author_id').notNull().references(() => users.id),
  relatedFishId: uuid('related_fish_id').references(() => fish.id),
  linkedEntryId: uuid('linked_entry_id'),
  photoId: uuid('photo_id').references(() => photos.id),
  // The vet visit the entry was written during (the author's open visit of the pond), if any.
  visitId: uuid('visit_id').references(() => visits.id),
  // The current revision's fields, copied here so lists and computations need no join.
  data: jsonb('data').$type<Record<string, unknown>>().notNull(),
  revision: integer('revision').notNull().default(1),
  enteredInError: boolean('entered_in_error').notNull().default(false),
  errorReason: text('error_reason'),
  errorById: uuid('error_by_id').references(() => users.id),
  errorAt: timestamp('error_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('timeline_fish_occurred_idx').on(t.fishId, t.occurredAt.desc(), t.id.desc()),
  // With the id as tie-breaker it serves both a kind-filtered page and "the latest entry of a kind" without sorting.
  index('timeline_fish_kind_occurred_idx').on(t.fishId, t.kind, t.occurredAt.desc(), t.id.desc()),
  index('timeline_pond_idx').on(t.pondId),
  index('timeline_author_idx').on(t.authorId),
  index('timeline_related_fish_idx').on(t.relatedFishId),
  index('timeline_linked_entry_idx').on(t.linkedEntryId),
  index('timeline_photo_idx').on(t.photoId),
  index('timeline_error_by_idx').on(t.errorById),
  index('timeline_visit_idx').on(t.visitId),
])

// Every revision ever written, the first included; rows here are never updated or deleted.
export const timelineRevisions = pgTable('timeline_revisions', {
  id: uuid('id').primaryKey().defaultRandom(),
  entryId: uuid('entry_id').notNull().references(() => timelineEntries.id),
  revision: integer('revision').notNull(),
  occurredAt: timestamp('occurred_at', { withTimezone: true }).notNull(),
  data: jsonb('data').$type<Record<string, unknown>>().notNull(),
  authorId: uuid('author_id').notNull().references(() => users.id),
  reason: text('reason'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  uniqueIndex('timeline_revisions_entry_revision_unique').on(t.entryId, t.revision),
  index('timeline_revisions_author_idx').on(t.authorId),
])

// Each dose of a treatment course checked off as given: who gave it and when. A dose is recorded
// once (the unique index), so two phones ticking the same dose cannot count it twice.
export const treatmentDoses = pgTable('treatment_doses', {
  id: uuid('id').primaryKey().defaultRandom(),
  entryId: uuid('entry_id').notNull().references(() => timelineEntries.id),
  doseNumber: integer('dose_number').notNull(),
  givenAt: timestamp('given_at', { withTimezone: true }).notNull(),
  givenById: uuid('given_by_id').notNull().references(() => users.id),
  note: text('note').notNull().default(''),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  uniqueIndex('treatment_doses_entry_dose_unique').on(t.entryId, t.doseNumber),
  index('treatment_doses_given_by_idx').on(t.givenById),
])
