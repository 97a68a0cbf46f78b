// Inputs and words of custody: a pond handed to a new owner, a fish moved or rehomed.
import { z } from 'zod'
import { emailSchema } from './auth-schemas'
import type { OfferMailState } from '../types'

import { HANDOVER_MEMBERS_OPTIONS } from './enums'

export type HandoverMembersOption = typeof HANDOVER_MEMBERS_OPTIONS[number]

/** What each option does, in the words the offer form and the acceptance page show. */
// `detail` speaks to the owner who offers the pond; `forRecipient` to the person who would receive it.
export const HANDOVER_MEMBERS_WORDS: Record<HandoverMembersOption, { label: string, detail: string, forRecipient: (sender: string) => string }> = {
  stay: {
    label: 'They stay',
    detail: 'Keepers and vets keep their roles; you and any other owner stay on as keepers.',
    forRecipient: sender => `The keepers and vets of the pond keep their roles, and ${sender} (with any other owner) stays on as a keeper. As the owner you can change anyone's role afterwards.`,
  },
  read_only: {
    label: 'They become read-only',
    detail: 'Everyone now in the pond, you included, can still see its whole history but change nothing.',
    forRecipient: sender => `Everyone now in the pond, ${sender} included, can still see its whole history but can change nothing. As the owner you decide later whether anyone gets a role back.`,
  },
  leave: {
    label: 'They leave',
    detail: 'Everyone now in the pond, you included, loses access when the new owner accepts.',
    forRecipient: sender => `Everyone now in the pond, ${sender} included, loses access when you accept: the pond is yours alone until you invite people.`,
  },
}

export const HANDOVER_LIFETIME_DAYS = 14

export const handoverCreateSchema = z.strictObject({
  email: emailSchema,
  membersOption: z.enum(HANDOVER_MEMBERS_OPTIONS, 'Choose what happens to the current members'),
})

export const handoverIdParams = z.object({ pondId: z.uuid('Not a valid id'), handoverId: z.uuid('Not a valid id') })

export type OfferState = 'open' | 'accepted' | 'withdrawn' | 'expired' | 'superseded'

export interface HandoverInfo {
  pondName: string
  fromName: string
  email: string
  membersOption: HandoverMembersOption
  state: OfferState
  expiresAt: string
  fishCount: number
}

export interface HandoverOffer {
  id: string
  email: string
  membersOption: HandoverMembersOption
  expiresAt: string
  createdAt: string
  mail: OfferMailState | null
}

export const memberReadOnlySchema = z.strictObject({ readOnly: z.boolean('Yes or no') })

// ---- moving and rehoming a fish -------------------------------------------------------------

const confirmSeparation = z.boolean('Yes or no').optional().default(false)

/** Someone who can see the fish now and will not once it has moved. */
export interface MemberLosingSight { id: string, name: string, role: string }

/** What moving a fish to a pond would change, shown before the owner confirms. */
export interface FishMovePreview {
  toPond: { id: string, name: string }
  losingSight: MemberLosingSight[]
  companions: SeparatedCompanion[]
}

export const fishMovePreviewQuery = z.strictObject({
  toPondId: z.uuid('Choose one of your ponds'),
})

export const fishMoveSchema = z.strictObject({
  toPondId: z.uuid('Choose one of your ponds'),
  confirmSeparation,
})

export const fishTransferCreateSchema = z.strictObject({
  email: emailSchema,
  confirmSeparation,
})

/** The new owner takes the fish into a pond of theirs, or into a new one named here. */
export const transferAcceptSchema = z.strictObject({
  toPondId: z.uuid('Choose one of your ponds').optional(),
  newPondName: z.string().trim().min(1, 'Give the new pond a name').max(120, 'At most 120 characters').optional(),
}).refine(d => (d.toPondId === undefined) !== (d.newPondName === undefined), { message: 'Choose one of your ponds or name a new one', path: ['toPondId'] })

export const transferIdParams = z.object({ fishId: z.uuid('Not a valid id'), transferId: z.uuid('Not a valid id') })

export interface FishTransferOffer {
  id: string
  email: string
  expiresAt: string
  createdAt: string
  mail: OfferMailState | null
}

export interface FishTransferInfo {
  fishName: string
  species: string
  variety: string
  fromPondName: string
  fromName: string
  email: string
  state: OfferState
  expiresAt: string
  /** Why it fell, when the fish moved or its pond changed hands before anyone accepted. */
  reason: string | null
}

export interface FishResidence {
  pondId: string
  pondName: string
  /** Calendar day the fish arrived: its acquired date or its record's creation for the first pond. */
  from: string
  /** Calendar day it left; null for the pond it lives in now. */
  until: string | null
  current: boolean
  /** The pond is still one the caller can open. */
  visible: boolean
}

export interface SeparatedCompanion { id: string, name: string }
