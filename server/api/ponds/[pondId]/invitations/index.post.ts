import { eq } from 'drizzle-orm'
import { formatDate } from '#shared/utils/dates'
import { invitationCreateSchema, pondIdParams } from '#shared/utils/pond-schemas'

const INVITATION_LIFETIME_MS = 14 * 24 * 60 * 60 * 1000

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user } = await requirePondRole(event, pondId, ['owner'])
  const input = await readValidated(event, invitationCreateSchema)
  const [pond] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  const { token, tokenHash } = newLinkToken()
  // The invitation and its e-mail commit together; the mail leaves through the outbox.
  const invitation = await useDb().transaction(async (tx) => {
    const [created] = await tx.insert(schema.invitations).values({
      pondId, email: input.email, role: input.role, tokenHash, invitedById: user.id,
      expiresAt: new Date(Date.now() + INVITATION_LIFETIME_MS),
    }).returning()
    await queueMail(tx, invitationMail({ to: input.email, inviterName: user.name, pondName: pond!.name, role: input.role, expiresOn: formatDate(created!.expiresAt, requestDateStyle(event)), link: `${appOrigin(event)}/invitations/${token}`, invitationId: created!.id }))
    await recordAudit(event, { pondId, action: 'invitation.sent', details: { invitationId: created!.id, email: input.email, role: input.role } }, tx)
    return created!
  })
  setResponseStatus(event, 201)
  return { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt }
})
