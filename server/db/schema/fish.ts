import { sql } from 'drizzle-orm'
import { boolean, check, date, doublePrecision, index, integer, jsonb, pgEnum, pgTable, smallint, text, timestamp, uniqueIndex, uuid, varchar } from 'drizzle-orm/pg-core'
import { FISH_SEXES, FISH_SPECIES, FISH_STATUSES } from '../../../shared/utils/enums'
import { timestamps } from './columns'
import { ponds } from './ponds'
import { users } from './users'

export const fishSpecies = pgEnum('fish_species', FISH_SPECIES)
export const fishSex = pgEnum('fish_sex', FISH_SEXES)
export const fishStatus = pgEnum('fish_status', FISH_STATUSES)

export const fish = pgTable('fish', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id),
  name: varchar('name', { length: 80 }).notNull(),
  species: fishSpecies('species').notNull(),
  scientificName: varchar('scientific_name', { length: 120 }).notNull(),
  variety: varchar('variety', { length: 80 }).notNull().default(''),
  sex: fishSex('sex').notNull().default('unknown'),
  hatchYear: integer('hatch_year'),
  hatchYearEstimated: boolean('hatch_year_estimated').notNull().default(false),
  acquiredOn: date('acquired_on'),
  acquiredFrom: varchar('acquired_from', { length: 160 }).notNull().default(''),
  microchip: varchar('microchip', { length: 15 }),
  features: text('features').notNull().default(''),
  status: fishStatus('status').notNull().default('alive'),
  profilePhotoId: uuid('profile_photo_id'),
  // Where the fish's head is on the profile photo, in percent across and down (CSS object-position); null is the centre.
  profileFocusX: smallint('profile_focus_x'),
  profileFocusY: smallint('profile_focus_y'),
  // Optimistic locking: a PATCH names the version it edited; a stale one is refused with 409.
  version: integer('version').notNull().default(1),
  ...timestamps,
}, t => [
  index('fish_pond_idx').on(t.pondId),
  index('fish_pond_name_idx').on(t.pondId, t.name),
  check('fish_profile_focus_range', sql`${t.profileFocusX} between 0 and 100 and ${t.profileFocusY} between 0 and 100`),
  uniqueIndex('fish_microchip_alive_unique').on(t.microchip).where(sql`${t.status} = 'alive' and ${t.microchip} is not null`),
])

export type FishFieldChange = { field: string, from: unknown, to: unknown }

export const fishEdits = pgTable('fish_edits', {
  id: uuid('id').primaryKey().defaultRandom(),
  fishId: uuid('fish_id').notNull().references(() => fish.id),
  userId: uuid('user_id').notNull().references(() => users.id),
  changes: jsonb('changes').$type<FishFieldChange[]>().notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('fish_edits_fish_idx').on(t.fishId, t.createdAt),
  index('fish_edits_user_idx').on(t.userId),
])

// Kept current by a trigger on timeline_entries (migration 0003), so the fish table needs no per-fish subqueries.
export const fishMeasurementSummary = pgTable('fish_measurement_summary', {
  fishId: uuid('fish_id').primaryKey().references(() => fish.id),
  weightG: doublePrecision('weight_g'),
  weighedAt: timestamp('weighed_at', { withTimezone: true }),
  lengthCm: doublePrecision('length_cm'),
  conditionWeightG: doublePrecision('condition_weight_g'),
  conditionK: doublePrecision('condition_k'),
  weightAlert: boolean('weight_alert').notNull().default(false),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
})

/**
 * The loss rule behind `weight_alert` above, as one row: scripts/migrate.ts writes it from WEIGHT_LOSS_RULE in
 * shared/utils/condition.ts on every start, and the summary function (drizzle/0022) reads it, so the SQL and the
 * TypeScript rule cannot drift apart.
 */
export const weightLossRule = pgTable('weight_loss_rule', {
  id: boolean('id').primaryKey().default(true),
  lossPercent: doublePrecision('loss_percent').notNull(),
  lossWindowDays: integer('loss_window_days').notNull(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [check('weight_loss_rule_one_row', sql`${t.id}`)])
