import { z } from 'zod'
import { and, eq, isNull } from 'drizzle-orm'

const params = z.object({ pondId: z.uuid(), invitationId: z.uuid() })

export default defineEventHandler(async (event) => {
  const { pondId, invitationId } = paramsValidated(event, params, 'Invitation not found')
  await requirePondRole(event, pondId, ['owner'])
  const [withdrawn] = await useDb().update(schema.invitations).set({ withdrawnAt: new Date() })
    .where(and(eq(schema.invitations.id, invitationId), eq(schema.invitations.pondId, pondId), isNull(schema.invitations.acceptedAt), isNull(schema.invitations.withdrawnAt)))
    .returning({ id: schema.invitations.id, email: schema.invitations.email, role: schema.invitations.role })
  if (!withdrawn) throw createError({ statusCode: 404, statusMessage: 'Invitation not found' })
  await recordAudit(event, { pondId, action: 'invitation.withdrawn', details: { invitationId, email: withdrawn.email, role: withdrawn.role } })
  return { ok: true }
})
