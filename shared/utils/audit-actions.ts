// The actions written to a pond's audit log, with the words the log shows for them.
export const AUDIT_ACTIONS = {
  'invitation.sent': 'Invitation sent',
  'invitation.withdrawn': 'Invitation withdrawn',
  'invitation.resent': 'Invitation sent again',
  'invitation.accepted': 'Invitation accepted',
  'member.role_changed': 'Role changed',
  'member.read_only_changed': 'Read-only access changed',
  'member.removed': 'Member removed',
  'handover.offered': 'Pond offered to a new owner',
  'handover.withdrawn': 'Pond offer withdrawn',
  'handover.resent': 'Pond offer sent again',
  'handover.accepted': 'Pond handed over',
  'fish.moved_out': 'Fish moved to another pond',
  'fish.moved_in': 'Fish moved in from another pond',
  'fish.transfer_offered': 'Fish offered to another owner',
  'fish.transfer_withdrawn': 'Fish offer withdrawn',
  'fish.transfer_resent': 'Fish offer sent again',
  'measurements.imported': 'Measurements imported from a spreadsheet',
  'pond.exported': 'Whole pond exported as an archive',
  'pond.imported': 'Pond created from an archive',
} as const

export type AuditAction = keyof typeof AUDIT_ACTIONS

export interface AuditEventView {
  id: string
  action: AuditAction
  label: string
  actor: { id: string, name: string }
  /** The person the action was about (a member whose role changed), when there is one. */
  subject: { id: string, name: string } | null
  /** describeAuditEvent's line, made on the server so every reader sees the same words. */
  summary: string
  details: Record<string, unknown>
  ip: string | null
  userAgent: string | null
  createdAt: string
}

export interface AuditPage {
  events: AuditEventView[]
  nextCursor: string | null
}

const MEMBERS_OPTION_WORDS: Record<string, string> = {
  stay: 'current members stay',
  read_only: 'current members become read-only',
  leave: 'current members leave',
}

/** One line saying what an audit event was about, from the details written with it. */
export function describeAuditEvent(action: string, details: Record<string, unknown>, subjectName?: string | null): string {
  const d = (key: string) => (details[key] == null ? '' : String(details[key]))
  const who = subjectName ?? 'a former member'
  switch (action) {
    case 'invitation.sent':
    case 'invitation.withdrawn':
    case 'invitation.resent':
    case 'invitation.accepted':
      return `${d('email')} as ${d('role')}`
    case 'member.role_changed':
      return `${who}: ${d('from')} → ${d('to')}`
    case 'member.read_only_changed':
      return `${who}: ${details.readOnly ? 'read-only' : 'may make changes again'}`
    case 'member.removed':
      return `${who} (${d('role')})`
    case 'handover.offered':
    case 'handover.withdrawn':
    case 'handover.resent':
      return `to ${d('email')}; ${MEMBERS_OPTION_WORDS[d('membersOption')] ?? ''}`
    case 'handover.accepted':
      return `from ${d('fromName')} to ${d('toName')}; ${MEMBERS_OPTION_WORDS[d('membersOption')] ?? ''}`
    case 'fish.moved_out':
      return `${d('fishName')} to ${d('toPondName')}${details.toOwnerName ? ` (${d('toOwnerName')})` : ''}`
    case 'fish.moved_in':
      return `${d('fishName')} from ${d('fromPondName')}${details.fromOwnerName ? ` (${d('fromOwnerName')})` : ''}`
    case 'fish.transfer_offered':
    case 'fish.transfer_withdrawn':
    case 'fish.transfer_resent':
      return `${d('fishName')} to ${d('email')}`
    case 'measurements.imported':
      return `${d('imported')} of ${d('rows')} rows from ${d('fileName')}`
    default:
      return ''
  }
}
