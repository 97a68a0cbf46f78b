// The access statements of the hot reads, with explicit imports so the benchmark times the very SQL the routes run.
// Each reads the session row behind the cookie (with its user), the caller's membership and the row asked for in
// one statement: a read of a fish or a pond then costs one round trip to PostgreSQL, not two or three.
import { and, eq, sql, type Placeholder } from 'drizzle-orm'
import type { NodePgDatabase } from 'drizzle-orm/node-postgres'
import * as schema from '../schema'

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- any drizzle database over node-postgres, with or without the schema
type Database = NodePgDatabase<any>
/** A value, or a placeholder filled in when a prepared statement runs. */
type Id = string | Placeholder

/** What a session row carries for its check (revoked, idle, too old) and the user it signs in. */
export const sessionCheckColumns = {
  session: { id: schema.sessions.id, createdAt: schema.sessions.createdAt, lastSeenAt: schema.sessions.lastSeenAt, revokedAt: schema.sessions.revokedAt },
  user: { id: schema.users.id, name: schema.users.name, email: schema.users.email, units: schema.users.units, decimalMark: schema.users.decimalMark },
}

/** The session row and its user alone (server/middleware/02.session.ts, for every other request). */
export function sessionRowQuery(db: Database, sessionId: Id) {
  return db.select(sessionCheckColumns).from(schema.sessions)
    .innerJoin(schema.users, eq(schema.users.id, schema.sessions.userId))
    .where(eq(schema.sessions.id, sessionId)).limit(1)
}

/**
 * The session row, and the fish with the caller's membership of its pond and the pond's name. No row: no such
 * session. Fish or role empty: no such fish, or not a member (both refused as 404 by the caller).
 */
export function fishAccessWithSessionQuery(db: Database, sessionId: Id, fishId: Id) {
  return db.select({ ...sessionCheckColumns, fish: schema.fish, role: schema.memberships.role, readOnly: schema.memberships.readOnly, pondName: schema.ponds.name })
    .from(schema.sessions)
    .innerJoin(schema.users, eq(schema.users.id, schema.sessions.userId))
    .leftJoin(schema.fish, eq(schema.fish.id, fishId))
    .leftJoin(schema.memberships, and(eq(schema.memberships.pondId, schema.fish.pondId), eq(schema.memberships.userId, schema.sessions.userId)))
    .leftJoin(schema.ponds, eq(schema.ponds.id, schema.fish.pondId))
    .where(eq(schema.sessions.id, sessionId)).limit(1)
}

/** The session row and the caller's membership of a pond (role empty: not a member, refused as 404). */
export function pondAccessWithSessionQuery(db: Database, sessionId: Id, pondId: Id) {
  return db.select({ ...sessionCheckColumns, role: schema.memberships.role, readOnly: schema.memberships.readOnly })
    .from(schema.sessions)
    .innerJoin(schema.users, eq(schema.users.id, schema.sessions.userId))
    .leftJoin(schema.memberships, and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, schema.sessions.userId)))
    .where(eq(schema.sessions.id, sessionId)).limit(1)
}

function prepareAll(db: Database) {
  const sessionId = sql.placeholder('sessionId')
  return {
    session: sessionRowQuery(db, sessionId).prepare('session_row'),
    fish: fishAccessWithSessionQuery(db, sessionId, sql.placeholder('fishId')).prepare('fish_access_with_session'),
    pond: pondAccessWithSessionQuery(db, sessionId, sql.placeholder('pondId')).prepare('pond_access_with_session'),
  }
}

const prepared = new WeakMap<Database, ReturnType<typeof prepareAll>>()

/**
 * The three statements above, built once per database and run as named prepared statements: building a select
 * of the fish's thirty columns through drizzle cost about as much CPU per request as PostgreSQL spent answering
 * it (--cpu-prof of GET /api/fish/:id: drizzle's `is` and query building), and a named statement is parsed and
 * planned once per connection instead of on every request.
 */
export function accessStatements(db: Database) {
  let statements = prepared.get(db)
  if (!statements) prepared.set(db, statements = prepareAll(db))
  return statements
}
