import type { H3Event } from 'h3'
import { and, eq } from 'drizzle-orm'
import type { PondRole, CurrentUser } from '#shared/types'
import { POND_ROLES } from '#shared/utils/enums'
import { accessStatements } from '../db/queries/access'

export const ANY_ROLE: readonly PondRole[] = POND_ROLES

function notFound(what: string) {
  return createError({ statusCode: 404, statusMessage: `${what} not found` })
}

function forbidden(roles: readonly PondRole[]) {
  return createError({ statusCode: 403, statusMessage: `Only a pond ${roles.join(' or ')} may do this` })
}

const READ_METHODS = new Set(['GET', 'HEAD'])

/**
 * A read-only member (kept on after a handover) may read everything their role reads and change nothing.
 * Whether a call writes is told by its HTTP method, not by the roles list it passes: routes are one per
 * method (GET reads, POST/PATCH/PUT/DELETE write), while a roles list cannot tell — the timeline's POST
 * passes the default list and decides by entry kind itself. So every access helper that reads a
 * membership (here, the timeline's requireEntryAccess, the photos' requirePhotoAccess) calls this.
 */
export function refuseReadOnlyWrite(event: H3Event, readOnly: boolean) {
  if (readOnly && !READ_METHODS.has(event.method)) {
    throw createError({ statusCode: 403, statusMessage: 'Read-only access', message: 'You have read-only access to this pond: you can see its records but not change them.' })
  }
}

/** What a membership row carries for an access decision. */
const membershipColumns = { role: schema.memberships.role, readOnly: schema.memberships.readOnly }

/**
 * The caller's membership of the pond a fish lives in: the one join through which a fish, its timeline
 * entries and its photos are reached. Use it as `.innerJoin(schema.memberships, membershipOfFishPond(userId))`
 * after joining `schema.fish`.
 */
function membershipOfFishPond(userId: string) {
  return and(eq(schema.memberships.pondId, schema.fish.pondId), eq(schema.memberships.userId, userId))
}

/** The decision on what the query found: nothing is 404 (as if it did not exist), another role 403, read-only members only read. */
function decide<T extends { role: PondRole, readOnly: boolean }>(event: H3Event, found: T | undefined, what: string, roles: readonly PondRole[]): T {
  if (!found) throw notFound(what)
  if (!roles.includes(found.role)) throw forbidden(roles)
  refuseReadOnlyWrite(event, found.readOnly)
  return found
}

/**
 * On the hot reads the session row is left to the access statement (server/middleware/02.session.ts): it is
 * checked first, exactly as the middleware would (no valid session: 401 before any 403 or 404), then the
 * membership found in the same row is decided on.
 */
function takeSessionToCheck(event: H3Event) {
  const pending = event.context.auth ? undefined : event.context.sessionToCheck
  event.context.sessionToCheck = undefined
  return pending
}

/**
 * The one place pond access is decided. The role is read from the database on every call,
 * so a removed member is refused on their very next request. Non-members get 404, like a pond that does not exist.
 */
export async function requirePondRole(event: H3Event, pondId: string, roles: readonly PondRole[] = ANY_ROLE) {
  const pending = takeSessionToCheck(event)
  if (pending) {
    const [row] = await accessStatements(useDb()).pond.execute({ sessionId: pending.id, pondId })
    await acceptSessionRow(event, row, pending.sealed)
    const user = requireUser(event)
    const { role, readOnly } = decide(event, row?.role ? { role: row.role, readOnly: row.readOnly! } : undefined, 'Pond', roles)
    return { user, role, readOnly }
  }
  const user = requireUser(event)
  const [membership] = await useDb().select(membershipColumns)
    .from(schema.memberships)
    .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, user.id)))
    .limit(1)
  const { role, readOnly } = decide(event, membership, 'Pond', roles)
  return { user, role, readOnly }
}

export interface FishAccess {
  user: CurrentUser
  role: PondRole
  readOnly: boolean
  fish: typeof schema.fish.$inferSelect
}

/** Same rule for a fish: it is visible only through a membership of the pond it lives in. */
export async function requireFishRole(event: H3Event, fishId: string, roles: readonly PondRole[] = ANY_ROLE): Promise<FishAccess & { pondName: string }> {
  const pending = takeSessionToCheck(event)
  if (pending) {
    const [row] = await accessStatements(useDb()).fish.execute({ sessionId: pending.id, fishId })
    await acceptSessionRow(event, row, pending.sealed)
    const user = requireUser(event)
    // Only a member's row counts: the fish of another pond is refused as if it did not exist.
    const found = row?.fish && row.role ? { fish: row.fish, role: row.role, readOnly: row.readOnly!, pondName: row.pondName! } : undefined
    const { fish, role, readOnly, pondName } = decide(event, found, 'Fish', roles)
    return { user, role, readOnly, fish, pondName }
  }
  const user = requireUser(event)
  // The pond's name comes in the same statement: the profile shows it, and a second round trip cost more than the join.
  const [row] = await useDb().select({ fish: schema.fish, ...membershipColumns, pondName: schema.ponds.name })
    .from(schema.fish)
    .innerJoin(schema.memberships, membershipOfFishPond(user.id))
    .innerJoin(schema.ponds, eq(schema.ponds.id, schema.fish.pondId))
    .where(eq(schema.fish.id, fishId))
    .limit(1)
  const { fish, role, readOnly, pondName } = decide(event, row, 'Fish', roles)
  return { user, role, readOnly, fish, pondName }
}

export interface EntryAccess extends FishAccess {
  entry: typeof schema.timelineEntries.$inferSelect
}

export interface PhotoAccess extends FishAccess {
  photo: typeof schema.photos.$inferSelect
}

/** A row that belongs to one fish (a timeline entry, a photo): reached only through that fish's pond membership. */
async function requireFishChild(event: H3Event, table: typeof schema.timelineEntries | typeof schema.photos, id: string, what: string, roles: readonly PondRole[]) {
  const user = requireUser(event)
  const [row] = await useDb().select({ child: table, fish: schema.fish, ...membershipColumns })
    .from(table)
    .innerJoin(schema.fish, eq(schema.fish.id, table.fishId))
    .innerJoin(schema.memberships, membershipOfFishPond(user.id))
    .where(eq(table.id, id))
    .limit(1)
  const { child, fish, role, readOnly } = decide(event, row, what, roles)
  return { user, role, readOnly, fish, child }
}

/** An entry is reached through its fish: only members of the pond the fish lives in see it (404 otherwise). */
export async function requireEntryAccess(event: H3Event, entryId: string, roles: readonly PondRole[] = ANY_ROLE): Promise<EntryAccess> {
  const { child, ...access } = await requireFishChild(event, schema.timelineEntries, entryId, 'Entry', roles)
  return { ...access, entry: child as EntryAccess['entry'] }
}

/** A photo exists for the caller only through a membership of its fish's pond: anyone else gets 404. */
export async function requirePhotoAccess(event: H3Event, photoId: string, roles: readonly PondRole[] = ANY_ROLE): Promise<PhotoAccess> {
  const { child, ...access } = await requireFishChild(event, schema.photos, photoId, 'Photo', roles)
  return { ...access, photo: child as PhotoAccess['photo'] }
}
