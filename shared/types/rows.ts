// Row types inferred from the Drizzle schema, and the JSON form a route answers them in. The API shapes in
// this folder are built from them, so a column's type, nullability and enum are written once, in
// server/db/schema (type-only imports: nothing of the server runs here).
import type { archivePeople } from '../../server/db/schema/archive-imports'
import type { fish, fishEdits } from '../../server/db/schema/fish'
import type { outgoingMail } from '../../server/db/schema/mail'
import type { photos } from '../../server/db/schema/photos'
import type { invitations, ponds } from '../../server/db/schema/ponds'
import type { timelineEntries, timelineRevisions } from '../../server/db/schema/timeline'
import type { users } from '../../server/db/schema/users'

export type FishRow = typeof fish.$inferSelect
export type NewFishRow = typeof fish.$inferInsert
export type PondRow = typeof ponds.$inferSelect
export type PhotoRow = typeof photos.$inferSelect
export type UserRow = typeof users.$inferSelect
export type TimelineEntryRow = typeof timelineEntries.$inferSelect
export type TimelineRevisionRow = typeof timelineRevisions.$inferSelect
export type ArchivePersonRow = typeof archivePeople.$inferSelect
export type FishEditRow = typeof fishEdits.$inferSelect
export type InvitationRow = typeof invitations.$inferSelect
export type OutgoingMailRow = typeof outgoingMail.$inferSelect

/** A row as its JSON answer carries it: a Date becomes its ISO string. */
export type AsJson<T> = { [K in keyof T]: T[K] extends Date ? string : T[K] extends Date | null ? string | null : T[K] }
