import type { H3Event } from 'h3'
import { and, eq } from 'drizzle-orm'
import type { PondRole, CurrentUser } from '#shared/types'

export const ANY_ROLE: readonly PondRole[] = ['owner', 'keeper', 'vet']

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

/**
 * The one place pond access is decided. The role is read from the database on every call,
 * so a removed member is refused on their very next request. Non-members get 404, like a pond that does not exist.
 */
export async function requirePondRole(event: H3Event, pondId: string, roles: readonly PondRole[] = ANY_ROLE) {
  const user = requireUser(event)
  const [membership] = await useDb().select({ role: schema.memberships.role, readOnly: schema.memberships.readOnly })
    .from(schema.memberships)
    .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, user.id)))
    .limit(1)
  if (!membership) throw notFound('Pond')
  if (!roles.includes(membership.role)) throw forbidden(roles)
  refuseReadOnlyWrite(event, membership.readOnly)
  return { user, role: membership.role as PondRole, readOnly: membership.readOnly }
}

export interface FishAccess {
  user: CurrentUser
  role: PondRole
  readOnly: boolean
  fish: typeof schema.fish.$inferSelect
  /** Read in the same statement: the profile shows it, and a second round trip cost more than the join. */
  pondName: string
}

/** Same rule for a fish: it is visible only through a membership of the pond it lives in. */
export async function requireFishRole(event: H3Event, fishId: string, roles: readonly PondRole[] = ANY_ROLE): Promise<FishAccess> {
  const user = requireUser(event)
  const [row] = await useDb().select({ fish: schema.fish, role: schema.memberships.role, readOnly: schema.memberships.readOnly, pondName: schema.ponds.name })
    .from(schema.fish)
    .innerJoin(schema.memberships, and(eq(schema.memberships.pondId, schema.fish.pondId), eq(schema.memberships.userId, user.id)))
    .innerJoin(schema.ponds, eq(schema.ponds.id, schema.fish.pondId))
    .where(eq(schema.fish.id, fishId))
    .limit(1)
  if (!row) throw notFound('Fish')
  if (!roles.includes(row.role)) throw forbidden(roles)
  refuseReadOnlyWrite(event, row.readOnly)
  return { user, role: row.role as PondRole, readOnly: row.readOnly, fish: row.fish, pondName: row.pondName }
}
