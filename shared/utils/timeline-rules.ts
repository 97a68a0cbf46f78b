// Who may write and amend which timeline entry. One table drives the server's refusal (403) and
// which kinds the add buttons offer, so the two can never disagree.
import type { PondRole } from '../types'
import type { EntryKind } from './timeline-schemas'

type Data = Record<string, unknown>

interface Limited {
  roles: readonly PondRole[]
  /** What the entry must say for these roles to write it. */
  allows: (data: Data) => boolean
  field: string
  message: string
  /** How the add button reads for these roles. */
  offerLabel: string
  /** 400 when the missing content is a field the form asks these roles for; 403 (the default) when it is beyond their role. */
  status?: 400 | 403
}

export interface EntryRule {
  label: string
  /** Roles that may write the kind with any content. */
  roles: readonly PondRole[]
  /** Roles that may write it only with certain content (a suspected problem, a treatment given on instruction). */
  limited?: Limited
  /** Always clinical, or clinical depending on the content. */
  clinical: boolean | ((data: Data) => boolean)
}

const EVERYONE: readonly PondRole[] = ['owner', 'keeper', 'vet']

const onInstruction = (data: Data) => typeof data.instructedById === 'string' && data.instructedById.trim() !== ''

export const ENTRY_RULES: Record<EntryKind, EntryRule> = {
  measurement: { label: 'Weight & length', roles: EVERYONE, clinical: false },
  observation: { label: 'Observation', roles: EVERYONE, clinical: false },
  exam: { label: 'Exam', roles: ['vet'], clinical: true },
  problem: {
    label: 'Problem',
    roles: ['vet'],
    limited: {
      roles: ['owner', 'keeper'],
      allows: data => data.status === 'suspected',
      field: 'data.status',
      message: 'Only a vet of the pond can confirm or resolve a problem: record it as suspected',
      offerLabel: 'Suspected problem',
    },
    clinical: data => data.status !== 'suspected',
  },
  procedure: { label: 'Procedure', roles: ['vet'], clinical: true },
  anaesthesia: { label: 'Anaesthesia', roles: ['vet'], clinical: true },
  treatment: {
    label: 'Treatment',
    roles: ['vet'],
    limited: {
      roles: ['owner', 'keeper'],
      // Which vet: the server checks that the id is a vet of the fish's pond.
      allows: onInstruction,
      field: 'data.instructedById',
      message: 'A treatment given on a vet’s instruction names the vet: choose one of the pond’s vets',
      offerLabel: 'Treatment given',
      status: 400,
    },
    // A treatment given on instruction is the giver's note of what they did; the prescription is the vet's.
    clinical: data => !onInstruction(data),
  },
  lab_result: { label: 'Lab result', roles: ['vet'], clinical: true },
  companion: { label: 'Companion', roles: EVERYONE, clinical: false },
  death: { label: 'Death', roles: ['owner', 'vet'], clinical: false },
}

export type WriteDecision = { allowed: true } | { allowed: false, message: string, field?: string, status?: 400 | 403 }

function rolesText(roles: readonly PondRole[]) {
  return roles.length === 1 ? `a ${roles[0]}` : `an ${roles.slice(0, -1).join(', ')} or ${roles.at(-1)}`
}

/** Whether someone with this pond role may write an entry of this kind with this content. */
export function writeDecision(role: PondRole, kind: EntryKind, data: Data): WriteDecision {
  const rule = ENTRY_RULES[kind]
  if (rule.roles.includes(role)) return { allowed: true }
  if (rule.limited?.roles.includes(role)) {
    return rule.limited.allows(data) ? { allowed: true } : { allowed: false, message: rule.limited.message, field: rule.limited.field, status: rule.limited.status }
  }
  const who = [...rule.roles, ...(rule.limited?.roles ?? [])]
  return { allowed: false, message: `${rule.label} entries are written by ${rolesText(who)} of the pond` }
}

export function isClinicalEntry(kind: EntryKind, data: Data): boolean {
  const clinical = ENTRY_RULES[kind].clinical
  return typeof clinical === 'function' ? clinical(data) : clinical
}

export interface OfferedKind {
  kind: EntryKind
  label: string
  /** True when the role may write only some content of this kind (the form then fixes that content). */
  limited: boolean
}

/** The kinds the add buttons offer to someone with this role, in the order they are shown. */
export function kindsOffered(role: PondRole): OfferedKind[] {
  return (Object.entries(ENTRY_RULES) as [EntryKind, EntryRule][]).flatMap(([kind, rule]): OfferedKind[] => {
    if (rule.roles.includes(role)) return [{ kind, label: rule.label, limited: false }]
    if (rule.limited?.roles.includes(role)) return [{ kind, label: rule.limited.offerLabel, limited: true }]
    return []
  })
}

/**
 * Amending or marking "entered in error": the author may, and a pond owner may for non-clinical
 * entries. The new content must then still be something this person may write.
 */
export function amendDecision(
  who: { userId: string, role: PondRole },
  entry: { authorId: string, kind: EntryKind, data: Data },
): WriteDecision {
  if (entry.authorId === who.userId) return { allowed: true }
  if (who.role === 'owner' && !isClinicalEntry(entry.kind, entry.data)) return { allowed: true }
  return {
    allowed: false,
    message: isClinicalEntry(entry.kind, entry.data)
      ? 'Only the vet who wrote this clinical entry can amend it'
      : 'Only its author or a pond owner can amend this entry',
  }
}

/**
 * Who may tick off a dose of a treatment course as given: whoever of the pond gives it, usually the
 * keeper. Read-only members are refused by the access check like every other write.
 */
export const DOSE_RECORDERS: readonly PondRole[] = EVERYONE

export function doseDecision(role: PondRole): WriteDecision {
  return DOSE_RECORDERS.includes(role) ? { allowed: true } : { allowed: false, message: `Doses are recorded by ${rolesText(DOSE_RECORDERS)} of the pond` }
}
