import { index, integer, pgEnum, pgTable, text, timestamp, uuid, varchar } from 'drizzle-orm/pg-core'
import { OUTGOING_MAIL_STATUSES } from '../../../shared/utils/enums'
import { timestamps } from './columns'

export const outgoingMailStatus = pgEnum('outgoing_mail_status', OUTGOING_MAIL_STATUSES)

/**
 * The mail outbox: a row is written in the same transaction as the thing it announces, and a
 * pg-boss job (`mail.send`, see server/utils/mail-outbox.ts) delivers it with retries.
 * `subjectType`/`subjectId` name what the mail is about (an invitation, handover, transfer...),
 * so a screen can show the state of the last mail of an offer.
 */
export const outgoingMail = pgTable('outgoing_mail', {
  id: uuid('id').primaryKey().defaultRandom(),
  to: varchar('to', { length: 254 }).notNull(),
  subject: text('subject').notNull(),
  text: text('text').notNull(),
  html: text('html'),
  kind: varchar('kind', { length: 64 }).notNull(),
  subjectType: varchar('subject_type', { length: 64 }),
  subjectId: uuid('subject_id'),
  status: outgoingMailStatus('status').notNull().default('queued'),
  attempts: integer('attempts').notNull().default(0),
  lastError: text('last_error'),
  sentAt: timestamp('sent_at', { withTimezone: true }),
  ...timestamps,
}, t => [
  index('outgoing_mail_subject_idx').on(t.subjectType, t.subjectId, t.createdAt),
  index('outgoing_mail_status_idx').on(t.status, t.createdAt),
])

export type OutgoingMail = typeof outgoingMail.$inferSelect
