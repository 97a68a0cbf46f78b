import { relations } from 'drizzle-orm'
import { users, sessions } from './users'
import { ponds, memberships, invitations } from './ponds'
import { fish, fishEdits } from './fish'
import { photos } from './photos'
import { timelineEntries, timelineRevisions, treatmentDoses } from './timeline'

export const usersRelations = relations(users, ({ many }) => ({ memberships: many(memberships), sessions: many(sessions) }))
export const sessionsRelations = relations(sessions, ({ one }) => ({ user: one(users, { fields: [sessions.userId], references: [users.id] }) }))
export const pondsRelations = relations(ponds, ({ many }) => ({ memberships: many(memberships), fish: many(fish), invitations: many(invitations) }))
export const membershipsRelations = relations(memberships, ({ one }) => ({
  pond: one(ponds, { fields: [memberships.pondId], references: [ponds.id] }),
  user: one(users, { fields: [memberships.userId], references: [users.id] }),
}))
export const invitationsRelations = relations(invitations, ({ one }) => ({ pond: one(ponds, { fields: [invitations.pondId], references: [ponds.id] }) }))
export const fishRelations = relations(fish, ({ one, many }) => ({
  pond: one(ponds, { fields: [fish.pondId], references: [ponds.id] }),
  edits: many(fishEdits),
  photos: many(photos),
  timeline: many(timelineEntries, { relationName: 'fishTimeline' }),
}))
export const fishEditsRelations = relations(fishEdits, ({ one }) => ({
  fish: one(fish, { fields: [fishEdits.fishId], references: [fish.id] }),
  user: one(users, { fields: [fishEdits.userId], references: [users.id] }),
}))
export const photosRelations = relations(photos, ({ one }) => ({
  fish: one(fish, { fields: [photos.fishId], references: [fish.id] }),
  uploader: one(users, { fields: [photos.uploaderId], references: [users.id] }),
}))
export const timelineEntriesRelations = relations(timelineEntries, ({ one, many }) => ({
  fish: one(fish, { fields: [timelineEntries.fishId], references: [fish.id], relationName: 'fishTimeline' }),
  author: one(users, { fields: [timelineEntries.authorId], references: [users.id] }),
  revisions: many(timelineRevisions),
  doses: many(treatmentDoses),
}))
export const treatmentDosesRelations = relations(treatmentDoses, ({ one }) => ({
  entry: one(timelineEntries, { fields: [treatmentDoses.entryId], references: [timelineEntries.id] }),
  givenBy: one(users, { fields: [treatmentDoses.givenById], references: [users.id] }),
}))
export const timelineRevisionsRelations = relations(timelineRevisions, ({ one }) => ({
  entry: one(timelineEntries, { fields: [timelineRevisions.entryId], references: [timelineEntries.id] }),
  author: one(users, { fields: [timelineRevisions.authorId], references: [users.id] }),
}))
