import { eq } from 'drizzle-orm'

export type InvitationState = 'open' | 'accepted' | 'withdrawn' | 'expired'

export async function findInvitation(token: string) {
  const [row] = await useDb().select({
    invitation: schema.invitations, pondName: schema.ponds.name, invitedBy: schema.users.name,
  }).from(schema.invitations)
    .innerJoin(schema.ponds, eq(schema.ponds.id, schema.invitations.pondId))
    .innerJoin(schema.users, eq(schema.users.id, schema.invitations.invitedById))
    .where(eq(schema.invitations.tokenHash, hashLinkToken(token)))
    .limit(1)
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Invitation not found' })
  const i = row.invitation
  const state: InvitationState = i.acceptedAt ? 'accepted' : i.withdrawnAt ? 'withdrawn' : i.expiresAt < new Date() ? 'expired' : 'open'
  return { ...row, state }
}
