// The pond archive: one ZIP holding manifest.json (this format's name and schema version, the counts and the
// sha256 of every data file), the records as JSON Lines under data/, the same records as CSV under csv/ for
// spreadsheets, and every photo original under photos/. Ids inside an archive are references between its
// records; an import gives every record a new id.
import { z } from 'zod'
import { FISH_SEXES, FISH_SPECIES, FISH_STATUSES, PHOTO_VIEWS, POND_ROLES, STORED_TIMELINE_KINDS } from './enums'
import { fishCreateSchema } from './fish-schemas'
import { ENTRY_DATA_SCHEMAS, type EntryKind } from './timeline-schemas'
import { writeDecision } from './timeline-rules'

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
  /** manifest.json: counts, checksums and the pond; a few kB for a real pond, so 1 MB is generous. */
  manifestBytes: 1024 * 1024,
  /** One JSON Lines record: an entry with every revision of a long lab result stays well under this. */
  lineBytes: 256 * 1024,
  /** Problems listed when records fail their schemas (the import is refused whole either way). */
  problemsListed: 20,
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

// The people who wrote the records, kept as text on import: never matched to, or made into, an account here.
// `role` is their role in the pond when the archive was made; older archives do not carry it.
export const personRecord = z.strictObject({
  ref: id,
  name: z.string().trim().min(1, 'Give the name').max(120, 'At most 120 characters'),
  email: z.email('Not an e-mail address').max(254).nullable(),
  role: z.enum(POND_ROLES).nullable().default(null),
})

export const fishRecord = z.strictObject({
  id, name: text(80).min(1), species: z.enum(FISH_SPECIES), scientificName: text(120), variety: text(80),
  sex: z.enum(FISH_SEXES), hatchYear: z.number().int().min(1800).max(3000).nullable(), hatchYearEstimated: z.boolean(),
  acquiredOn: z.iso.date().nullable(), acquiredFrom: text(160), microchip: z.string().regex(/^\d{15}$/).nullable(), features: text(2000),
  status: z.enum(FISH_STATUSES), profilePhotoId: id.nullable(), createdAt: isoTime, updatedAt: isoTime,
}).superRefine((f, ctx) => {
  // The same rules as a fish created here (name, microchip check digits, years, dates).
  const live = fishCreateSchema.safeParse({
    name: f.name, species: f.species, scientificName: f.scientificName, variety: f.variety, sex: f.sex, hatchYear: f.hatchYear,
    acquiredOn: f.acquiredOn, acquiredFrom: f.acquiredFrom, microchip: f.microchip, features: f.features,
  })
  if (!live.success) for (const issue of live.error.issues) ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message })
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
  id, fishId: id, uploader: id, originalName: text(255), view: z.enum(PHOTO_VIEWS), caption: text(300),
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

// Moves and owner changes are written by the app's custody work, not typed in a form: short flat facts.
const custodyData = z.record(z.string().max(60), z.union([z.string().max(500), z.number(), z.boolean(), z.null()]))
  .refine(data => Object.keys(data).length <= 40, 'At most 40 fields')

/**
 * An entry's data checked as a live write checks it: by its kind's schema, and against the role rules
 * when the archive says which role its author had. Answers the checked data (with a live write's
 * defaults) or the problems, each with the field it is about.
 */
export function checkEntryData(kind: string, data: unknown, authorRole: typeof POND_ROLES[number] | null):
{ ok: true, data: Record<string, unknown> } | { ok: false, problems: { field: string, message: string }[] } {
  if (kind === 'move' || kind === 'owner_change') {
    const parsed = custodyData.safeParse(data)
    return parsed.success ? { ok: true, data: parsed.data } : { ok: false, problems: parsed.error.issues.map(i => ({ field: ['data', ...i.path].join('.'), message: i.message })) }
  }
  if (!(kind in ENTRY_DATA_SCHEMAS)) return { ok: false, problems: [{ field: 'kind', message: `"${kind}" entries are not written through the timeline` }] }
  const parsed = ENTRY_DATA_SCHEMAS[kind as EntryKind].safeParse(data)
  if (!parsed.success) return { ok: false, problems: parsed.error.issues.map(i => ({ field: ['data', ...i.path].join('.'), message: i.message })) }
  if (authorRole) {
    const decision = writeDecision(authorRole, kind as EntryKind, parsed.data as Record<string, unknown>)
    if (!decision.allowed) return { ok: false, problems: [{ field: decision.field ?? 'author', message: `${decision.message} (the archive says its author was a ${authorRole})` }] }
  }
  return { ok: true, data: parsed.data as Record<string, unknown> }
}
