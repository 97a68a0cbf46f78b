import { z } from 'zod'
import type { PondRole } from '../types'
import { PHOTO_VIEWS } from './enums'

export const PHOTO_VIEW_LABELS: Record<typeof PHOTO_VIEWS[number], string> = {
  top: 'From above',
  left: 'Left side',
  right: 'Right side',
  closeup: 'Close-up',
  other: 'Other view',
}

const view = z.enum(PHOTO_VIEWS, 'Choose from above, left side, right side, close-up or other')
const caption = z.string().trim().max(300, 'At most 300 characters')

export const photoUpdateSchema = z.strictObject({ view: view.optional(), caption: caption.optional() })
  .refine(value => value.view !== undefined || value.caption !== undefined, { message: 'Change the view or the caption', path: ['_'] })

const percent = (axis: string) => z.number(`Give the ${axis} position as a number`).int('A whole percent').min(0, 'At least 0 %').max(100, 'At most 100 %')

/** Who may choose a fish's profile picture and where its head is on it. */
export const PROFILE_PHOTO_ROLES: readonly PondRole[] = ['owner', 'keeper']

export const profilePhotoSchema = z.strictObject({
  photoId: z.uuid('Not a valid photo id').nullable(),
  // Where the fish's head is, in percent across and down; a new picture without one is centred.
  focus: z.strictObject({ x: percent('across'), y: percent('down') }).nullable().optional(),
})

export const photoIdParams = z.object({ photoId: z.uuid('Not a valid id') })

/** What a tus client puts in Upload-Metadata; uploaderId and anything else the server sets itself. */
export const uploadMetadataSchema = z.object({
  fishId: z.uuid('Name the fish the photo belongs to'),
  filename: z.string().trim().max(255, 'The file name is longer than 255 characters').default(''),
  view: view.default('other'),
  caption: caption.default(''),
})

export type PhotoUpdateInput = z.infer<typeof photoUpdateSchema>
