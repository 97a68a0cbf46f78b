import { z } from 'zod'
import { formatDate } from '#shared/utils/dates'
import { and, eq, gt, isNull } from 'drizzle-orm'

const params = z.object({ pondId: z.uuid(), invitationId: z.uuid() })

/** Sends an open invitation again with a fresh link; the earlier link stops working. */
export default defineEventHandler(async (event) => {
  const { pondId, invitationId } = paramsValidated(event, params, 'Invitation not found')
  const { user } = await requirePondRole(event, pondId, ['owner'])
  const [pond] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  const { token, tokenHash } = newLinkToken()
  await useDb().transaction(async (tx) => {
    const [invitation] = await tx.update(schema.invitations).set({ tokenHash })
      .where(and(eq(schema.invitations.id, invitationId), eq(schema.invitations.pondId, pondId), isNull(schema.invitations.acceptedAt), isNull(schema.invitations.withdrawnAt), gt(schema.invitations.expiresAt, new Date())))
      .returning()
    if (!invitation) throw createError({ statusCode: 404, statusMessage: 'Invitation not found', message: 'No open invitation with this id: it may have been accepted, withdrawn or expired.' })
    await queueMail(tx, invitationMail({ to: invitation.email, inviterName: user.name, pondName: pond!.name, role: invitation.role, expiresOn: formatDate(invitation.expiresAt, requestDateStyle(event)), link: `${appOrigin(event)}/invitations/${token}`, invitationId }))
    await recordAudit(event, { pondId, action: 'invitation.resent', details: { invitationId, email: invitation.email, role: invitation.role } }, tx)
  })
  setResponseStatus(event, 202)
  return { ok: true }
})
