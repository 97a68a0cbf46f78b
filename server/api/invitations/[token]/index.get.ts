export default defineEventHandler(async (event) => {
  const { invitation, pondName, invitedBy, state } = await findInvitation(getRouterParam(event, 'token') ?? '')
  return { pondName, invitedBy, email: invitation.email, role: invitation.role, state, expiresAt: invitation.expiresAt }
})
