import type { H3Event } from 'h3'
import { and, eq, isNull, ne } from 'drizzle-orm'
import type { CurrentUser } from '#shared/types'

declare module 'h3' {
  interface H3EventContext {
    auth?: { sessionId: string, user: CurrentUser }
    /** The Cookie header `auth` was read from (server/middleware/02.session.ts). */
    authCookie?: string
  }
}

declare module '#auth-utils' {
  interface User { id: string, name: string }
  interface UserSession { sessionId?: string }
}

export async function startSession(event: H3Event, user: { id: string, name: string }) {
  const [row] = await useDb().insert(schema.sessions)
    .values({ userId: user.id, userAgent: getHeader(event, 'user-agent')?.slice(0, 300) ?? null })
    .returning({ id: schema.sessions.id })
  await replaceUserSession(event, { user: { id: user.id, name: user.name }, sessionId: row!.id, loggedInAt: Date.now() })
  return row!.id
}

export async function revokeSession(sessionId: string) {
  await useDb().update(schema.sessions).set({ revokedAt: new Date() })
    .where(and(eq(schema.sessions.id, sessionId), isNull(schema.sessions.revokedAt)))
}

/** Ends every session of the user (a copied cookie included), optionally keeping one. */
export async function revokeAllSessions(userId: string, exceptSessionId?: string) {
  const conditions = [eq(schema.sessions.userId, userId), isNull(schema.sessions.revokedAt)]
  if (exceptSessionId) conditions.push(ne(schema.sessions.id, exceptSessionId))
  await useDb().update(schema.sessions).set({ revokedAt: new Date() }).where(and(...conditions))
}

export function requireUser(event: H3Event): CurrentUser {
  const user = event.context.auth?.user
  if (!user) throw createError({ statusCode: 401, statusMessage: 'Sign in first' })
  return user
}

export function publicUser(user: CurrentUser): CurrentUser {
  return { id: user.id, name: user.name, email: user.email, units: user.units, decimalMark: user.decimalMark }
}
