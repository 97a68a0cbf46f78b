import { HANDOVER_LIFETIME_DAYS, HANDOVER_MEMBERS_WORDS, type HandoverMembersOption } from '#shared/utils/custody-schemas'

// The words of each offer's e-mail, used when the offer is made and when its sender resends it
// (a resend carries a fresh link, so the words are composed again rather than copied). The words speak to
// the recipient; `expiresOn` is the expiry date in the sender's date style.

export function invitationMail(input: { to: string, inviterName: string, pondName: string, role: string, expiresOn: string, link: string, invitationId: string }): QueuedMessage {
  return {
    to: input.to,
    kind: 'invitation', subjectType: 'invitation', subjectId: input.invitationId,
    subject: `${input.inviterName} invites you to the pond "${input.pondName}" on Fintrail`,
    text: `Hello,\n\n${input.inviterName} invites you to join the pond "${input.pondName}" on Fintrail as ${input.role}.\n\nOpen this link to accept; the invitation expires on ${input.expiresOn}. If you have no account yet, you can create one there with this e-mail address:\n\n${input.link}\n`,
  }
}

export function handoverMail(input: { to: string, fromName: string, pondName: string, fishCount: number, membersOption: HandoverMembersOption, expiresOn: string, link: string, handoverId: string }): QueuedMessage {
  const words = HANDOVER_MEMBERS_WORDS[input.membersOption]
  return {
    to: input.to,
    kind: 'handover', subjectType: 'handover', subjectId: input.handoverId,
    subject: `${input.fromName} offers you the pond "${input.pondName}" on Fintrail`,
    text: `Hello,\n\n${input.fromName} would like to hand the pond "${input.pondName}" over to you on Fintrail: you would become its owner, with its ${input.fishCount} fish and their whole history.\n\nWhat happens when you accept: ${words.forRecipient(input.fromName)}\n\nNothing changes until you accept. Open this link to accept; the offer expires on ${input.expiresOn} (in ${HANDOVER_LIFETIME_DAYS} days). If you have no account yet, you can create one there with this e-mail address:\n\n${input.link}\n`,
  }
}

export function transferMail(input: { to: string, fromName: string, fishName: string, species: string, expiresOn: string, link: string, transferId: string }): QueuedMessage {
  return {
    to: input.to,
    kind: 'transfer', subjectType: 'transfer', subjectId: input.transferId,
    subject: `${input.fromName} offers you the fish "${input.fishName}" on Fintrail`,
    text: `Hello,\n\n${input.fromName} would like to rehome the ${input.species} "${input.fishName}" with you on Fintrail. It comes with its whole history: every entry, photo and companion note.\n\nNothing changes until you accept. Open this link to accept it into one of your ponds; the offer expires on ${input.expiresOn}. If you have no account yet, you can create one there with this e-mail address:\n\n${input.link}\n`,
  }
}
