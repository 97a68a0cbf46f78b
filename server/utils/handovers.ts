import type { H3Event } from 'h3'
import { and, count, eq, isNull } from 'drizzle-orm'
import type { CurrentUser, PondRole } from '#shared/types'
import type { HandoverMembersOption, OfferState } from '#shared/utils/custody-schemas'
import type { Tx } from './db'

type HandoverRow = typeof schema.pondHandovers.$inferSelect

/** Handover offers and fish transfer offers share their life: open, then accepted, withdrawn, expired or superseded. */
export function offerState(offer: { acceptedAt: Date | null, withdrawnAt: Date | null, expiresAt: Date }, superseded: boolean): OfferState {
  if (offer.acceptedAt) return 'accepted'
  if (superseded) return 'superseded'
  if (offer.withdrawnAt) return 'withdrawn'
  return offer.expiresAt < new Date() ? 'expired' : 'open'
}

/**
 * Why an offer cannot be accepted. Withdrawn and expired offers are gone (410); one that lost to
 * another acceptance is a conflict with what happened meanwhile (409), and says so.
 */
export function closedOfferError(state: Exclude<OfferState, 'open'>, what: string, supersededReason = 'another offer was accepted first.') {
  const reasons: Record<typeof state, { status: number, message: string }> = {
    accepted: { status: 409, message: `This ${what} was already accepted.` },
    superseded: { status: 409, message: `This ${what} can no longer be accepted: ${supersededReason}` },
    withdrawn: { status: 410, message: `This ${what} was withdrawn. Ask the owner for a new one.` },
    expired: { status: 410, message: `This ${what} has expired. Ask the owner for a new one.` },
  }
  const reason = reasons[state]
  return createError({ statusCode: reason.status, statusMessage: `This ${what} is ${state}`, message: reason.message, data: { state } })
}

export async function findHandover(token: string) {
  const [row] = await useDb().select({ handover: schema.pondHandovers, pondName: schema.ponds.name, fromName: schema.users.name })
    .from(schema.pondHandovers)
    .innerJoin(schema.ponds, eq(schema.ponds.id, schema.pondHandovers.pondId))
    .innerJoin(schema.users, eq(schema.users.id, schema.pondHandovers.fromUserId))
    .where(eq(schema.pondHandovers.tokenHash, hashLinkToken(token)))
    .limit(1)
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Offer not found' })
  return { ...row, state: offerState(row.handover, Boolean(row.handover.supersededById)) }
}

export async function pondFishCount(pondId: string) {
  const [row] = await useDb().select({ n: count() }).from(schema.fish).where(eq(schema.fish.pondId, pondId))
  return row?.n ?? 0
}

interface MemberChange { userId: string, name: string, from: PondRole, to: PondRole | 'removed', readOnly: boolean }

/**
 * The members option applies to everyone in the pond but the new owner, the previous owners included:
 * a pond has the owners it was handed to, so a previous owner who stays becomes a keeper (they keep
 * looking after the fish, but no longer hand over, export or manage people), one who becomes
 * read-only is a read-only keeper, and one who leaves is removed like everyone else.
 */
async function applyMembersOption(tx: Tx, pondId: string, acceptorId: string, option: HandoverMembersOption): Promise<MemberChange[]> {
  const members = await tx.select({ userId: schema.memberships.userId, role: schema.memberships.role, readOnly: schema.memberships.readOnly, name: schema.users.name })
    .from(schema.memberships)
    .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
    .where(eq(schema.memberships.pondId, pondId))
  const changes: MemberChange[] = []
  for (const m of members.filter(m => m.userId !== acceptorId)) {
    const where = and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, m.userId))
    if (option === 'leave') {
      await tx.delete(schema.memberships).where(where)
      changes.push({ userId: m.userId, name: m.name, from: m.role, to: 'removed', readOnly: false })
      continue
    }
    const role: PondRole = m.role === 'owner' ? 'keeper' : m.role
    const readOnly = option === 'read_only' || m.readOnly
    await tx.update(schema.memberships).set({ role, readOnly, updatedAt: new Date() }).where(where)
    changes.push({ userId: m.userId, name: m.name, from: m.role, to: role, readOnly })
  }
  await tx.insert(schema.memberships).values({ pondId, userId: acceptorId, role: 'owner', readOnly: false })
    .onConflictDoUpdate({ target: [schema.memberships.pondId, schema.memberships.userId], set: { role: 'owner', readOnly: false, updatedAt: new Date() } })
  return changes
}

/**
 * Accepting is one transaction on the locked pond row: of two acceptances at once (two offers of the
 * same pond, or the same link twice) the second waits, then finds its offer closed and gets a 409.
 */
export async function acceptHandover(event: H3Event, found: Pick<HandoverRow, 'id' | 'pondId'>, user: CurrentUser) {
  const now = new Date()
  return useDb().transaction(async (tx) => {
    await lockPonds(tx, [found.pondId])
    const [offer] = await tx.select().from(schema.pondHandovers).where(eq(schema.pondHandovers.id, found.id)).for('update')
    const state = offerState(offer!, Boolean(offer!.supersededById))
    if (state !== 'open') throw closedOfferError(state, 'offer')
    const pondId = offer!.pondId
    const [from] = await tx.select({ name: schema.users.name, email: schema.users.email }).from(schema.memberships)
      .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
      .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, offer!.fromUserId), eq(schema.memberships.role, 'owner')))
    if (!from) throw createError({ statusCode: 409, statusMessage: 'Offer no longer valid', message: 'The person who offered this pond is no longer one of its owners, so the offer no longer stands.' })

    const members = await applyMembersOption(tx, pondId, user.id, offer!.membersOption)
    await tx.update(schema.pondHandovers).set({ acceptedAt: now, acceptedById: user.id }).where(eq(schema.pondHandovers.id, offer!.id))
    // Every other open offer of this pond, and the old owner's open invitations, fall with the change of hands.
    await tx.update(schema.pondHandovers).set({ withdrawnAt: now, supersededById: offer!.id })
      .where(and(eq(schema.pondHandovers.pondId, pondId), isNull(schema.pondHandovers.acceptedAt), isNull(schema.pondHandovers.withdrawnAt)))
    await tx.update(schema.invitations).set({ withdrawnAt: now })
      .where(and(eq(schema.invitations.pondId, pondId), isNull(schema.invitations.acceptedAt), isNull(schema.invitations.withdrawnAt)))
    await supersedeTransfers(tx, { fromPondId: pondId }, 'the pond it lived in has changed hands since.')

    const record = { from: from.name, to: user.name, fromUserId: offer!.fromUserId, toUserId: user.id, membersOption: offer!.membersOption, handoverId: offer!.id }
    const fishCount = await writeOwnerChangeEntries(tx, pondId, now, user.id, record)
    await recordAudit(event, {
      pondId, action: 'handover.accepted',
      details: { handoverId: offer!.id, email: offer!.toEmail, fromName: from.name, toName: user.name, fromUserId: offer!.fromUserId, membersOption: offer!.membersOption, members, fishCount },
    }, tx)
    const [pond] = await tx.select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
    await queueMail(tx, {
      to: from.email, kind: 'handover-accepted', subjectType: 'handover', subjectId: offer!.id,
      subject: `${user.name} accepted the pond "${pond!.name}" on Fintrail`,
      text: `Hello ${from.name},\n\n${user.name} accepted your offer: they are now the owner of "${pond!.name}" and its ${fishCount} fish.\n`,
    })
    return { pondId, fromUserId: offer!.fromUserId, fromName: from.name, fishCount, members }
  })
}
