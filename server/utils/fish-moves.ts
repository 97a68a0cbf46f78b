import type { H3Event } from 'h3'
import { and, eq, isNull, ne, sql } from 'drizzle-orm'
import type { MemberLosingSight, SeparatedCompanion } from '#shared/utils/custody-schemas'
import type { Tx } from './db'

type FishRow = typeof schema.fish.$inferSelect
interface PondRef { id: string, name: string }

/**
 * Living fish of the same pond that a companion note links to this one, either way round (a blind fish
 * that follows it, a fish it always swims with): moving this fish leaves them behind.
 */
export async function companionsLeftBehind(db: { execute: Tx['execute'] }, fish: Pick<FishRow, 'id' | 'pondId'>): Promise<SeparatedCompanion[]> {
  const result = await db.execute<{ id: string, name: string }>(sql`
    select distinct f.id, f.name
    from timeline_entries e
    join fish f on f.id = case when e.fish_id = ${fish.id} then e.related_fish_id else e.fish_id end
    where e.kind = 'companion' and not e.entered_in_error and (e.fish_id = ${fish.id} or e.related_fish_id = ${fish.id})
      and f.id <> ${fish.id} and f.pond_id = ${fish.pondId} and f.status = 'alive'
    order by f.name`)
  return result.rows.map(r => ({ id: r.id, name: r.name }))
}

/** Members of the pond the fish leaves who are not members of the pond it goes to: they lose sight of it. */
export async function membersLosingSight(db: { execute: Tx['execute'] }, fromPondId: string, toPondId: string): Promise<MemberLosingSight[]> {
  const result = await db.execute<{ id: string, name: string, role: string }>(sql`
    select u.id, u.name, m.role::text as role
    from memberships m join users u on u.id = m.user_id
    where m.pond_id = ${fromPondId}
      and not exists (select 1 from memberships n where n.pond_id = ${toPondId} and n.user_id = m.user_id)
    order by u.name`)
  return result.rows.map(r => ({ id: r.id, name: r.name, role: r.role }))
}

export function separationNeedsConfirmation(fishName: string, companions: SeparatedCompanion[]) {
  const names = companions.map(c => c.name).join(', ')
  return createError({
    statusCode: 409,
    statusMessage: 'Companions would be separated',
    message: `${names} ${companions.length === 1 ? 'is' : 'are'} linked to ${fishName} by companion notes and would stay behind. Confirm the separation to move ${fishName} anyway.`,
    data: { companions, needsConfirmation: true },
  })
}

/** Open transfer offers that can no longer be honoured, closed with the reason their link will show. */
export async function supersedeTransfers(tx: Tx, where: { fishId?: string, fromPondId?: string, exceptId?: string }, reason: string) {
  await tx.update(schema.fishTransfers).set({ withdrawnAt: new Date(), supersededReason: reason }).where(and(
    where.fishId ? eq(schema.fishTransfers.fishId, where.fishId) : undefined,
    where.fromPondId ? eq(schema.fishTransfers.fromPondId, where.fromPondId) : undefined,
    where.exceptId ? ne(schema.fishTransfers.id, where.exceptId) : undefined,
    isNull(schema.fishTransfers.acceptedAt), isNull(schema.fishTransfers.withdrawnAt),
  ))
}

/** Locks the fish row and reads it again: what the caller checked before the transaction may have changed. */
export async function lockedFish(tx: Tx, fishId: string) {
  const [row] = await tx.select().from(schema.fish).where(eq(schema.fish.id, fishId)).for('update')
  return row!
}

export async function isOwnerOf(tx: Tx, pondId: string, userId: string) {
  const [row] = await tx.select({ id: schema.memberships.id }).from(schema.memberships)
    .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, userId), eq(schema.memberships.role, 'owner')))
  return Boolean(row)
}

export interface MoveInput {
  fish: FishRow
  from: PondRef
  to: PondRef
  actorId: string
  companions: SeparatedCompanion[]
  /** Set when the fish goes to another owner through an accepted offer. */
  transfer?: { id: string, fromOwner: string, toOwner: string }
}

/**
 * Moves a fish inside the caller's transaction. Its entries and photos key on the fish, so they travel
 * as they are (each entry keeps the pond it was written in); the move is an entry of its own, and each
 * companion left behind gets an observation saying so.
 */
export async function moveFish(event: H3Event, tx: Tx, input: MoveInput) {
  const { fish, from, to, transfer, companions } = input
  const at = new Date()
  await tx.update(schema.fish).set({ pondId: to.id, version: sql`${schema.fish.version} + 1`, updatedAt: at }).where(eq(schema.fish.id, fish.id))
  await tx.insert(schema.fishEdits).values({ fishId: fish.id, userId: input.actorId, changes: [{ field: 'pond', from: from.name, to: to.name }] })
  const day = at.toISOString().slice(0, 10)
  const where = transfer ? 'it went to a new owner' : `it moved to ${to.name}`
  const [moveEntry] = await writeCustodyEntries(tx, [
    {
      fishId: fish.id, pondId: from.id, kind: 'move', occurredAt: at, authorId: input.actorId,
      data: {
        fromPond: from, toPond: to,
        ...(transfer ? { transferId: transfer.id, fromOwner: transfer.fromOwner, toOwner: transfer.toOwner } : {}),
        ...(companions.length ? { separatedFrom: companions } : {}),
      },
    },
    // An observation, in the timeline's own shape: the companion did not move, it lost its companion.
    ...companions.map(c => ({
      fishId: c.id, pondId: from.id, kind: 'observation' as const, occurredAt: at, authorId: input.actorId,
      data: { signs: [], text: `Separated from ${fish.name}: ${where} on ${day}.` },
    })),
  ])
  await supersedeTransfers(tx, { fishId: fish.id, exceptId: transfer?.id }, 'the fish has moved since this offer was made.')
  const details = {
    fishId: fish.id, fishName: fish.name, fromPondId: from.id, fromPondName: from.name, toPondId: to.id, toPondName: to.name,
    separatedFrom: companions, ...(transfer ? { transferId: transfer.id, fromOwnerName: transfer.fromOwner, toOwnerName: transfer.toOwner } : {}),
  }
  await recordAudit(event, { pondId: from.id, action: 'fish.moved_out', details }, tx)
  await recordAudit(event, { pondId: to.id, action: 'fish.moved_in', details }, tx)
  return moveEntry!
}

export async function pondRef(tx: Tx, pondId: string): Promise<PondRef> {
  const [pond] = await tx.select({ id: schema.ponds.id, name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  return pond!
}
