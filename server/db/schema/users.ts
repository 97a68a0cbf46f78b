import { sql } from 'drizzle-orm'
import { boolean, index, integer, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid, varchar } from 'drizzle-orm/pg-core'
import { DECIMAL_MARKS, UNIT_SYSTEMS } from '../../../shared/utils/enums'
import { timestamps } from './columns'

export const unitSystem = pgEnum('unit_system', UNIT_SYSTEMS)
// How the person writes decimals: read by shared/utils/decimal.ts for every number they type.
export const decimalMark = pgEnum('decimal_mark', DECIMAL_MARKS)

export const users = pgTable('users', {
  id: uuid('id').primaryKey().defaultRandom(),
  email: varchar('email', { length: 254 }).notNull(),
  name: varchar('name', { length: 120 }).notNull(),
  passwordHash: text('password_hash').notNull(),
  units: unitSystem('units').notNull().default('metric'),
  decimalMark: decimalMark('decimal_mark').notNull().default('point'),
  // The daily e-mail of what is due in the person's ponds; they can turn it off on the account page.
  dueDigest: boolean('due_digest').notNull().default(true),
  ...timestamps,
}, t => [uniqueIndex('users_email_unique').on(sql`lower(${t.email})`)])

// A row per signed-in browser: the cookie holds only its id, so revoking the row ends the session.
export const sessions = pgTable('sessions', {
  id: uuid('id').primaryKey().defaultRandom(),
  userId: uuid('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  lastSeenAt: timestamp('last_seen_at', { withTimezone: true }).notNull().defaultNow(),
  revokedAt: timestamp('revoked_at', { withTimezone: true }),
  userAgent: varchar('user_agent', { length: 300 }),
}, t => [index('sessions_user_idx').on(t.userId)])

export const passwordResets = pgTable('password_resets', {
  id: uuid('id').primaryKey().defaultRandom(),
  userId: uuid('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  usedAt: timestamp('used_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [index('password_resets_user_idx').on(t.userId)])

// Failed sign-ins, keyed by account ("email:...") and by client address ("ip:...").
export const signInFailures = pgTable('sign_in_failures', {
  id: integer('id').primaryKey().generatedAlwaysAsIdentity(),
  key: varchar('key', { length: 300 }).notNull(),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, t => [index('sign_in_failures_key_at_idx').on(t.key, t.at)])
