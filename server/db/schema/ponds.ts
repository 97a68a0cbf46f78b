import { boolean, index, integer, jsonb, numeric, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid, varchar } from 'drizzle-orm/pg-core'
import { POND_ROLES } from '../../../shared/utils/enums'
import type { PondVolumeMeasurement } from '../../../shared/utils/pond-volume-schemas'
import type { PondWaterTargets } from '../../../shared/utils/water-targets'
import { timestamps } from './columns'
import { users } from './users'

export const pondRole = pgEnum('pond_role', POND_ROLES)

export const ponds = pgTable('ponds', {
  id: uuid('id').primaryKey().defaultRandom(),
  name: varchar('name', { length: 120 }).notNull(),
  volumeLitres: numeric('volume_litres', { precision: 12, scale: 1, mode: 'number' }),
  // How the volume was worked out (shape, unit, readings); null when it was typed as a number.
  volumeMeasurement: jsonb('volume_measurement').$type<PondVolumeMeasurement>(),
  // The pond's own target ranges; a parameter not listed uses the published default.
  waterTargets: jsonb('water_targets').$type<PondWaterTargets>().notNull().default({}),
  notes: text('notes').notNull().default(''),
  // The yearly health check falls on this month and day (MM-DD); spring by default.
  healthCheckDay: varchar('health_check_day', { length: 5 }).notNull().default('04-01'),
  // Days between water tests before one counts as overdue.
  waterTestIntervalDays: integer('water_test_interval_days').notNull().default(7),
  ...timestamps,
})

export const memberships = pgTable('memberships', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id, { onDelete: 'cascade' }),
  userId: uuid('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  role: pondRole('role').notNull(),
  // Kept on after a handover to see the history, but every write is refused (server/utils/access.ts).
  readOnly: boolean('read_only').notNull().default(false),
  ...timestamps,
}, t => [
  uniqueIndex('memberships_pond_user_unique').on(t.pondId, t.userId),
  index('memberships_user_idx').on(t.userId),
])

export const invitations = pgTable('invitations', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id, { onDelete: 'cascade' }),
  email: varchar('email', { length: 254 }).notNull(),
  role: pondRole('role').notNull(),
  tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
  invitedById: uuid('invited_by_id').notNull().references(() => users.id),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  acceptedAt: timestamp('accepted_at', { withTimezone: true }),
  acceptedById: uuid('accepted_by_id').references(() => users.id),
  withdrawnAt: timestamp('withdrawn_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('invitations_pond_idx').on(t.pondId),
  index('invitations_invited_by_idx').on(t.invitedById),
  index('invitations_accepted_by_idx').on(t.acceptedById),
])
