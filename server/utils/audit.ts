import type { H3Event } from 'h3'
import type { AuditAction } from '#shared/utils/audit-actions'
import type { Tx } from './db'

export interface AuditInput {
  pondId: string | null
  action: AuditAction
  details?: Record<string, unknown>
}

/**
 * Writes one line of the audit log: the signed-in person, the client's address and browser.
 * Pass the transaction when the action runs in one, so the action and its record stand or fall together.
 */
export async function recordAudit(event: H3Event, input: AuditInput, tx?: Tx) {
  const actor = requireUser(event)
  await (tx ?? useDb()).insert(schema.auditEvents).values({
    pondId: input.pondId,
    actorId: actor.id,
    action: input.action,
    details: input.details ?? {},
    ip: clientAddress(event).slice(0, 64),
    userAgent: getHeader(event, 'user-agent')?.slice(0, 300) ?? null,
  })
}
