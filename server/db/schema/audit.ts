import { index, jsonb, pgTable, timestamp, uuid, varchar } from 'drizzle-orm/pg-core'
import { ponds } from './ponds'
import { users } from './users'

// Who did what to a pond, when and from where. Rows are only ever added (a trigger refuses changes, migration 0008).
export const auditEvents = pgTable('audit_events', {
  id: uuid('id').primaryKey().defaultRandom(),
  // Null for an action that belongs to no pond (none yet; kept open for account-level events).
  pondId: uuid('pond_id').references(() => ponds.id),
  actorId: uuid('actor_id').notNull().references(() => users.id),
  action: varchar('action', { length: 60 }).notNull(),
  details: jsonb('details').$type<Record<string, unknown>>().notNull().default({}),
  ip: varchar('ip', { length: 64 }),
  userAgent: varchar('user_agent', { length: 300 }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('audit_events_pond_created_idx').on(t.pondId, t.createdAt.desc(), t.id.desc()),
  index('audit_events_actor_idx').on(t.actorId),
])
