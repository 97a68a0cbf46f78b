import type { EntryKind } from '#shared/utils/timeline-schemas'
import type { PlausibilityWarning } from '#shared/utils/plausibility'

// What waits in the outbox on this device. Each item carries the id the device made for what it will create
// (entry, water test) so that sending it twice finds the first one; a photo carries its tus upload address
// once the upload exists, so a later try resumes where the bytes stopped.

interface ItemBase {
  id: string
  /** Order written on this device: items are sent oldest first. */
  seq: number
  createdAt: string
  /** A short line saying what this is, for the outbox page ("Weight & length · Hana"). */
  label: string
  pondId: string
  fishId?: string
  fishName?: string
  state: 'waiting' | 'sending' | 'failed'
  /** Why the server refused it, in its own words (kept with the item until the person copies or discards it). */
  reason?: string
  status?: number
  tries: number
}

export interface EntryItem extends ItemBase {
  type: 'entry'
  fishId: string
  body: { id: string, kind: EntryKind, occurredAt: string, data: Record<string, unknown>, acknowledgedWarnings?: string[] } & Record<string, unknown>
  /** A measurement the server found unusual: shown so the person can check and send it anyway. */
  warnings?: PlausibilityWarning[]
}

export interface WaterTestItem extends ItemBase {
  type: 'water-test'
  body: { id: string, testedAt: string } & Record<string, unknown>
}

export interface PhotoItem extends ItemBase {
  type: 'photo'
  fishId: string
  file: Blob
  fileName: string
  view: string
  caption: string
  /** The tus upload's address, once created: a later try asks it how far the bytes got. */
  uploadUrl?: string
  photoId?: string
}

/** A dose of a treatment course ticked off as given; `givenAt` is the moment of the tick, not of the send. */
export interface DoseItem extends ItemBase {
  type: 'dose'
  fishId: string
  /** The treatment entry whose course this dose belongs to. */
  entryId: string
  body: { id: string, doseNumber: number, givenAt: string }
}

export type OutboxItem = EntryItem | WaterTestItem | PhotoItem | DoseItem

/** What someone can copy out of a refused item to record it another way. */
export function itemAsText(item: OutboxItem): string {
  const lines = [`${item.label} — written on this device ${new Date(item.createdAt).toLocaleString('en-GB')}`]
  if (item.type === 'entry') lines.push(`Recorded for: ${item.body.occurredAt}`, JSON.stringify(item.body.data, null, 2))
  if (item.type === 'water-test') lines.push(JSON.stringify(item.body, null, 2))
  if (item.type === 'dose') lines.push(`Dose ${item.body.doseNumber} given at ${item.body.givenAt}`)
  if (item.type === 'photo') lines.push(`Photo file: ${item.fileName}${item.caption ? ` — ${item.caption}` : ''}`)
  if (item.reason) lines.push(`Not sent: ${item.reason}`)
  return lines.join('\n')
}
