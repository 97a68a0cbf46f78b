import { boolean, index, pgEnum, pgTable, text, timestamp, uuid, varchar } from 'drizzle-orm/pg-core'
import { HANDOVER_MEMBERS_OPTIONS } from '../../../shared/utils/enums'
import { fish } from './fish'
import { ponds } from './ponds'
import { users } from './users'

// What happens to the people of a pond when it changes hands (see server/utils/handovers.ts).
export const handoverMembersOption = pgEnum('handover_members_option', HANDOVER_MEMBERS_OPTIONS)

/** An owner's offer of a whole pond to a new owner, accepted through a mailed link. */
export const pondHandovers = pgTable('pond_handovers', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id),
  fromUserId: uuid('from_user_id').notNull().references(() => users.id),
  toEmail: varchar('to_email', { length: 254 }).notNull(),
  membersOption: handoverMembersOption('members_option').notNull(),
  tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  acceptedAt: timestamp('accepted_at', { withTimezone: true }),
  acceptedById: uuid('accepted_by_id').references(() => users.id),
  withdrawnAt: timestamp('withdrawn_at', { withTimezone: true }),
  // Set when another offer of the same pond was accepted first: this one can no longer be.
  supersededById: uuid('superseded_by_id'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('pond_handovers_pond_idx').on(t.pondId),
  index('pond_handovers_from_user_idx').on(t.fromUserId),
  index('pond_handovers_accepted_by_idx').on(t.acceptedById),
  index('pond_handovers_superseded_by_idx').on(t.supersededById),
])

/** An owner's offer of one fish to another owner, who accepts it into a pond of their own. */
export const fishTransfers = pgTable('fish_transfers', {
  id: uuid('id').primaryKey().defaultRandom(),
  fishId: uuid('fish_id').notNull().references(() => fish.id),
  fromPondId: uuid('from_pond_id').notNull().references(() => ponds.id),
  fromUserId: uuid('from_user_id').notNull().references(() => users.id),
  toEmail: varchar('to_email', { length: 254 }).notNull(),
  tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
  // The sender agreed to separate the fish from its companions when offering it.
  confirmedSeparation: boolean('confirmed_separation').notNull().default(false),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  acceptedAt: timestamp('accepted_at', { withTimezone: true }),
  acceptedById: uuid('accepted_by_id').references(() => users.id),
  toPondId: uuid('to_pond_id').references(() => ponds.id),
  withdrawnAt: timestamp('withdrawn_at', { withTimezone: true }),
  // Why the offer fell without being withdrawn: the fish moved, or its pond changed hands.
  supersededReason: text('superseded_reason'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('fish_transfers_fish_idx').on(t.fishId),
  index('fish_transfers_from_pond_idx').on(t.fromPondId),
  index('fish_transfers_from_user_idx').on(t.fromUserId),
  index('fish_transfers_accepted_by_idx').on(t.acceptedById),
  index('fish_transfers_to_pond_idx').on(t.toPondId),
])
