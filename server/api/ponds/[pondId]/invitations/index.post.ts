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
  const [invitation] = await useDb().insert(schema.invitations).values({
    pondId, email: input.email, role: input.role, tokenHash, invitedById: user.id,
    expiresAt: new Date(Date.now() + INVITATION_LIFETIME_MS),
  }).returning()
  const link = `${appOrigin(event)}/invitations/${token}`
  await sendMail({
    to: input.email,
    subject: `${user.name} invites you to the pond "${pond!.name}" on Fintrail`,
    text: `Hello,\n\n${user.name} invites you to join the pond "${pond!.name}" on Fintrail as ${input.role}.\n\nOpen this link to accept; the invitation expires on ${formatDate(invitation!.expiresAt, requestDateStyle(event))}. If you have no account yet, you can create one there with this e-mail address:\n\n${link}\n`,
  })
  await recordAudit(event, { pondId, action: 'invitation.sent', details: { invitationId: invitation!.id, email: input.email, role: input.role } })
  setResponseStatus(event, 201)
  return { id: invitation!.id, email: invitation!.email, role: invitation!.role, expiresAt: invitation!.expiresAt }
})
