import { boolean, date, index, jsonb, numeric, pgEnum, pgTable, primaryKey, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core'
import { VISIT_PURPOSES, WHOLE_POND_EVENT_KINDS } from '../../../shared/utils/enums'
import { sql } from 'drizzle-orm'
import { fish } from './fish'
import { ponds } from './ponds'
import { users } from './users'

export const pondEventKind = pgEnum('pond_event_kind', WHOLE_POND_EVENT_KINDS)
export const visitPurpose = pgEnum('visit_purpose', VISIT_PURPOSES)

/** A vet's call at a pond: open while the vet works there, closed with findings (the summary goes out then). */
export const visits = pgTable('visits', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id),
  vetId: uuid('vet_id').notNull().references(() => users.id),
  visitedOn: date('visited_on').notNull(),
  purpose: visitPurpose('purpose').notNull(),
  findings: text('findings').notNull().default(''),
  openedAt: timestamp('opened_at', { withTimezone: true }).notNull().defaultNow(),
  closedAt: timestamp('closed_at', { withTimezone: true }),
}, t => [
  index('visits_pond_idx').on(t.pondId, t.visitedOn),
  index('visits_vet_idx').on(t.vetId),
  // One open visit per vet and pond: an entry the vet writes there belongs to that one.
  uniqueIndex('visits_open_unique').on(t.pondId, t.vetId).where(sql`${t.closedAt} is null`),
])

/** The fish the vet ticked as seen during a visit. */
export const visitFish = pgTable('visit_fish', {
  visitId: uuid('visit_id').notNull().references(() => visits.id),
  fishId: uuid('fish_id').notNull().references(() => fish.id),
}, t => [
  primaryKey({ columns: [t.visitId, t.fishId] }),
  index('visit_fish_fish_idx').on(t.fishId),
])

/**
 * Something given to or happening to the whole pond (salt, a bath treatment of the pond, a water change,
 * a mortality event). Written once here; each fish's timeline shows it when the fish lived in the pond then.
 */
export const pondEvents = pgTable('pond_events', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id),
  kind: pondEventKind('kind').notNull(),
  occurredAt: timestamp('occurred_at', { withTimezone: true }).notNull(),
  authorId: uuid('author_id').notNull().references(() => users.id),
  visitId: uuid('visit_id').references(() => visits.id),
  // The water volume the amounts were worked out for, kept with the event: the pond's figure can change later.
  volumeLitres: numeric('volume_litres', { precision: 12, scale: 1, mode: 'number' }),
  data: jsonb('data').$type<Record<string, unknown>>().notNull(),
  enteredInError: boolean('entered_in_error').notNull().default(false),
  errorReason: text('error_reason'),
  errorById: uuid('error_by_id').references(() => users.id),
  errorAt: timestamp('error_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('pond_events_pond_occurred_idx').on(t.pondId, t.occurredAt.desc(), t.id.desc()),
  index('pond_events_author_idx').on(t.authorId),
  index('pond_events_visit_idx').on(t.visitId),
  index('pond_events_error_by_idx').on(t.errorById),
])

// The day digest sent to a person, so a retried or repeated job run sends it once.
export const dueDigests = pgTable('due_digests', {
  userId: uuid('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  day: date('day').notNull(),
  sentAt: timestamp('sent_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [primaryKey({ columns: [t.userId, t.day] })])
