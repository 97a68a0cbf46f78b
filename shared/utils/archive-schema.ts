// The pond archive: one ZIP holding manifest.json (this format's name and schema version, the counts and the
// sha256 of every data file), the records as JSON Lines under data/, the same records as CSV under csv/ for
// spreadsheets, and every photo original under photos/. Ids inside an archive are references between its
// records; an import gives every record a new id.
import { z } from 'zod'
import { STORED_TIMELINE_KINDS } from './timeline-schemas'

export const ARCHIVE_FORMAT = 'fintrail-pond-archive'
export const ARCHIVE_SCHEMA_VERSION = 1

export const ARCHIVE_LIMITS = {
  /** The whole upload. */
  archiveBytes: 20 * 1024 ** 3,
  /** One data file (JSON Lines or CSV) once unpacked. */
  dataFileBytes: 512 * 1024 ** 2,
  /** One photo original, as for uploads. */
  photoBytes: 40 * 1024 ** 2,
  /** Everything unpacked together. */
  totalUnpackedBytes: 24 * 1024 ** 3,
  /** Unpacked size over packed size of one entry beyond which it is treated as a zip bomb. */
  compressionRatio: 200,
  entries: 200_000,
  lineBytes: 1024 * 1024,
} as const

export const DATA_FILES = ['people', 'fish', 'fish-edits', 'timeline', 'photos'] as const
export type DataFile = typeof DATA_FILES[number]

const id = z.uuid()
const isoTime = z.iso.datetime({ offset: true })
const text = (max: number) => z.string().max(max)

export const manifestSchema = z.strictObject({
  format: z.literal(ARCHIVE_FORMAT, `Not a Fintrail pond archive (format must be "${ARCHIVE_FORMAT}")`),
  schemaVersion: z.literal(ARCHIVE_SCHEMA_VERSION, `This Fintrail reads pond archives of schema version ${ARCHIVE_SCHEMA_VERSION}`),
  exportedAt: isoTime,
  pond: z.strictObject({ id, name: text(120).min(1), volumeLitres: z.number().min(0).nullable(), notes: text(4000), createdAt: isoTime }),
  files: z.record(z.string(), z.strictObject({ sha256: z.string().regex(/^[0-9a-f]{64}$/), lines: z.number().int().min(0), bytes: z.number().int().min(0) })),
  counts: z.strictObject({ people: z.number().int(), fish: z.number().int(), fishEdits: z.number().int(), timeline: z.number().int(), photos: z.number().int() }),
})
export type ArchiveManifest = z.infer<typeof manifestSchema>

export const personRecord = z.strictObject({ ref: id, name: text(120).min(1), email: text(254).min(3) })

export const fishRecord = z.strictObject({
  id, name: text(80).min(1), species: z.enum(['koi', 'goldfish', 'other']), scientificName: text(120), variety: text(80),
  sex: z.enum(['unknown', 'male', 'female']), hatchYear: z.number().int().min(1800).max(3000).nullable(), hatchYearEstimated: z.boolean(),
  acquiredOn: z.iso.date().nullable(), acquiredFrom: text(160), microchip: z.string().regex(/^\d{15}$/).nullable(), features: text(2000),
  status: z.enum(['alive', 'deceased', 'rehomed']), profilePhotoId: id.nullable(), createdAt: isoTime, updatedAt: isoTime,
})

export const fishEditRecord = z.strictObject({
  fishId: id, by: id, createdAt: isoTime,
  changes: z.array(z.strictObject({ field: text(60), from: z.unknown(), to: z.unknown() })).max(40),
})

const revisionRecord = z.strictObject({
  revision: z.number().int().min(1), occurredAt: isoTime, data: z.record(z.string(), z.unknown()), author: id, reason: text(2000).nullable(), createdAt: isoTime,
})

// A dose of a treatment course ticked off as given. Archives made before doses were recorded have none.
const doseRecord = z.strictObject({ doseNumber: z.number().int().min(1).max(1000), givenAt: isoTime, givenBy: id, note: text(500), createdAt: isoTime })

export const timelineRecord = z.strictObject({
  id, fishId: id, kind: z.enum(STORED_TIMELINE_KINDS), occurredAt: isoTime, author: id,
  relatedFishId: id.nullable(), linkedEntryId: id.nullable(), photoId: id.nullable(),
  data: z.record(z.string(), z.unknown()), revision: z.number().int().min(1),
  enteredInError: z.boolean(), errorReason: text(2000).nullable(), errorBy: id.nullable(), errorAt: isoTime.nullable(),
  createdAt: isoTime, revisions: z.array(revisionRecord).min(1).max(1000),
  doses: z.array(doseRecord).max(1000).optional(),
}).refine(r => r.revisions.length === r.revision && r.revisions.every((v, i) => v.revision === i + 1), 'Revisions must run 1, 2, … up to the current one')
  .refine(r => !r.doses?.length || (r.kind === 'treatment' && new Set(r.doses.map(d => d.doseNumber)).size === r.doses.length), 'Doses belong to a treatment, each dose once')

export const photoRecord = z.strictObject({
  id, fishId: id, uploader: id, originalName: text(255), view: z.enum(['top', 'left', 'right', 'closeup', 'other']), caption: text(300),
  takenAt: isoTime.nullable(), createdAt: isoTime, removedAt: isoTime.nullable(), mime: z.enum(['image/jpeg', 'image/png', 'image/webp']),
  bytes: z.number().int().min(1).max(ARCHIVE_LIMITS.photoBytes), sha256: z.string().regex(/^[0-9a-f]{64}$/), file: z.string().regex(/^photos\/[0-9a-f-]{36}\.(jpg|png|webp)$/),
})

export const RECORD_SCHEMAS = {
  'people': personRecord,
  'fish': fishRecord,
  'fish-edits': fishEditRecord,
  'timeline': timelineRecord,
  'photos': photoRecord,
} as const satisfies Record<DataFile, z.ZodType>

export type ArchiveRecord<F extends DataFile> = z.infer<typeof RECORD_SCHEMAS[F]>
