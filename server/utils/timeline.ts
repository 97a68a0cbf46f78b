import type { H3Event } from 'h3'
import { and, eq, ne, sql } from 'drizzle-orm'
import type { z } from 'zod'
import type { FieldErrors, PondRole } from '#shared/types'
import type { ImportedAuthorship } from '#shared/types/timeline'
import { ENTRY_DATA_SCHEMAS, type EntryKind } from '#shared/utils/timeline-schemas'
import { ENTRY_KINDS } from '#shared/utils/enums'
import { amendDecision, ENTRY_RULES, writeDecision } from '#shared/utils/timeline-rules'
import { analyteFlag, enucleationConflict, eyeState, isEnucleation, isProlongedRecovery, measurementDerived, treatmentLastDay, type EntryDerived, type EyeRemoval } from '#shared/utils/timeline-derived'
import { treatmentSchedule, type GivenDose } from '#shared/utils/treatment-schedule'
import { fieldErrorsFrom } from '#shared/utils/field-errors'
import { AUTHOR_COLUMNS, authorJoins, dosesOf, type TimelineRow } from '../db/queries/timeline'
import type { Tx } from './db'
import type { EntryAccess } from './access'
import type { FishRow } from '#shared/types/rows'

export function isEntryKind(kind: string): kind is EntryKind {
  return (ENTRY_KINDS as readonly string[]).includes(kind)
}

export function badEntry(fieldErrors: FieldErrors, message = 'Some fields need attention') {
  return createError({ statusCode: 400, statusMessage: 'Invalid input', message, data: { fieldErrors } })
}

export function refuseWrite(role: PondRole, kind: EntryKind, data: Record<string, unknown>) {
  const decision = writeDecision(role, kind, data)
  if (decision.allowed) return
  throw createError({
    statusCode: decision.status ?? 403,
    statusMessage: decision.status === 400 ? 'Invalid input' : 'Not allowed',
    message: decision.message,
    data: { fieldErrors: decision.field ? { [decision.field]: [decision.message] } : {} },
  })
}

/**
 * A role that may never write a kind (a keeper and an exam) is refused before the fields are
 * checked: telling them which fields are missing would only invite them to fill them in.
 */
export async function refuseKindOutright(event: H3Event, role: PondRole) {
  let body: unknown
  try {
    body = await readBody(event)
  }
  catch {
    return // readValidated answers with the 400
  }
  const kind = (body as { kind?: unknown } | null)?.kind
  if (typeof kind !== 'string' || !isEntryKind(kind)) return
  const rule = ENTRY_RULES[kind]
  if (!rule.roles.includes(role) && !rule.limited?.roles.includes(role)) refuseWrite(role, kind, {})
}

/** Checks amended fields against the entry's own kind; messages carry the same `data.` paths as a new entry's. */
export function validateEntryData<K extends EntryKind>(kind: K, data: unknown): z.output<typeof ENTRY_DATA_SCHEMAS[K]> {
  const result = ENTRY_DATA_SCHEMAS[kind].safeParse(data)
  if (!result.success) {
    const errors = fieldErrorsFrom(result.error)
    throw badEntry(Object.fromEntries(Object.entries(errors).map(([key, list]) => [key === '_' ? 'data' : `data.${key}`, list])))
  }
  return result.data as z.output<typeof ENTRY_DATA_SCHEMAS[K]>
}

export function refuseAmend(access: EntryAccess) {
  const { entry, user, role } = access
  if (!isEntryKind(entry.kind)) throw createError({ statusCode: 400, statusMessage: 'Not amendable here', message: 'This kind of entry is corrected where it was made' })
  const decision = amendDecision({ userId: user.id, role }, { authorId: entry.authorId ?? '', kind: entry.kind, data: entry.data })
  if (!decision.allowed) throw createError({ statusCode: 403, statusMessage: 'Not allowed', message: decision.message })
  return entry.kind
}

// ---- checks that need the database --------------------------------------------------------------

async function eyeStateOf(tx: Tx, fishId: string, exceptEntryId?: string) {
  const rows = await tx.select({ id: schema.timelineEntries.id, occurredAt: schema.timelineEntries.occurredAt, data: schema.timelineEntries.data })
    .from(schema.timelineEntries)
    .where(and(
      eq(schema.timelineEntries.fishId, fishId), eq(schema.timelineEntries.kind, 'procedure'), eq(schema.timelineEntries.enteredInError, false),
      exceptEntryId ? ne(schema.timelineEntries.id, exceptEntryId) : undefined,
    ))
  const removals: EyeRemoval[] = rows
    .filter(r => isEnucleation(r.data))
    .map(r => ({ entryId: r.id, on: r.occurredAt.toISOString().slice(0, 10), side: r.data.side as EyeRemoval['side'] }))
  return eyeState(removals)
}

/**
 * What an entry points at must make sense: an eye is removed once, a companion lives in the same
 * pond, a linked anaesthesia record and a photo belong to this fish, a fish dies once.
 */
export async function checkEntryReferences(tx: Tx, fish: FishRow, kind: EntryKind, data: Record<string, unknown>, exceptEntryId?: string) {
  if (kind === 'procedure' && isEnucleation(data)) {
    const conflict = enucleationConflict(await eyeStateOf(tx, fish.id, exceptEntryId), data.side as EyeRemoval['side'])
    if (conflict) throw badEntry({ 'data.side': [conflict] }, conflict)
  }
  if (kind === 'procedure' && typeof data.anaesthesiaEntryId === 'string') {
    const [linked] = await tx.select({ id: schema.timelineEntries.id }).from(schema.timelineEntries).where(and(
      eq(schema.timelineEntries.id, data.anaesthesiaEntryId), eq(schema.timelineEntries.fishId, fish.id),
      eq(schema.timelineEntries.kind, 'anaesthesia'), eq(schema.timelineEntries.enteredInError, false),
    ))
    if (!linked) throw badEntry({ 'data.anaesthesiaEntryId': ['Not an anaesthesia record of this fish'] })
  }
  if (kind === 'companion') {
    const relatedId = String(data.relatedFishId)
    const [other] = await tx.select({ id: schema.fish.id }).from(schema.fish)
      .where(and(eq(schema.fish.id, relatedId), eq(schema.fish.pondId, fish.pondId)))
    if (relatedId === fish.id) throw badEntry({ 'data.relatedFishId': ['Choose another fish, not this one'] })
    if (!other) throw badEntry({ 'data.relatedFishId': ['Choose a fish of the same pond'] })
  }
  if (kind === 'observation' && typeof data.photoId === 'string') {
    const [photo] = await tx.select({ id: schema.photos.id }).from(schema.photos)
      .where(and(eq(schema.photos.id, data.photoId), eq(schema.photos.fishId, fish.id), sql`${schema.photos.removedAt} is null`))
    if (!photo) throw badEntry({ 'data.photoId': ['Choose one of this fish’s photos'] })
  }
  if (kind === 'death') {
    const [earlier] = await tx.select({ at: schema.timelineEntries.occurredAt }).from(schema.timelineEntries).where(and(
      eq(schema.timelineEntries.fishId, fish.id), eq(schema.timelineEntries.kind, 'death'), eq(schema.timelineEntries.enteredInError, false),
      exceptEntryId ? ne(schema.timelineEntries.id, exceptEntryId) : undefined,
    ))
    if (earlier) throw badEntry({ _: [`A death is already recorded on ${earlier.at.toISOString().slice(0, 10)}`] })
  }
}

/** A vet of this pond (read-only members included: an earlier instruction stays traceable), or null. */
async function pondVet(tx: Tx, pondId: string, userId: string) {
  const [vet] = await tx.select({ id: schema.users.id, name: schema.users.name }).from(schema.memberships)
    .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
    .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, userId), eq(schema.memberships.role, 'vet')))
  return vet ?? null
}

/**
 * People named by id must be vets of the fish's pond; their names are written beside the id so the
 * record reads the same in print and in an archive. Answers the data to store.
 */
export async function resolvePeople(tx: Tx, fish: FishRow, kind: EntryKind, data: Record<string, unknown>): Promise<Record<string, unknown>> {
  const field = kind === 'procedure' ? 'performedById' : kind === 'treatment' ? 'instructedById' : null
  if (!field || typeof data[field] !== 'string') return data
  const vet = await pondVet(tx, fish.pondId, data[field])
  if (!vet) throw badEntry({ [`data.${field}`]: ['Choose one of the pond’s vets'] })
  return kind === 'procedure' ? { ...data, performedBy: vet.name } : { ...data, instructedBy: vet.name }
}

/** The columns that mirror parts of the data, so joins and indexes need not read JSON. */
export function mirroredColumns(kind: EntryKind, data: Record<string, unknown>) {
  return {
    relatedFishId: kind === 'companion' ? String(data.relatedFishId) : null,
    linkedEntryId: kind === 'procedure' && typeof data.anaesthesiaEntryId === 'string' ? data.anaesthesiaEntryId : null,
    photoId: kind === 'observation' && typeof data.photoId === 'string' ? data.photoId : null,
  }
}

/** Writes an entry and its first revision; the database refuses an entry changed without one. */
export async function insertEntry(tx: Tx, values: { id?: string, fish: FishRow, kind: EntryKind, occurredAt: Date, authorId: string, data: Record<string, unknown> }) {
  const [entry] = await tx.insert(schema.timelineEntries).values({
    ...(values.id ? { id: values.id } : {}),
    fishId: values.fish.id, pondId: values.fish.pondId, kind: values.kind, occurredAt: values.occurredAt,
    authorId: values.authorId, data: values.data, ...mirroredColumns(values.kind, values.data),
    visitId: await openVisitId(tx, values.fish.pondId, values.authorId),
  }).returning()
  await tx.insert(schema.timelineRevisions).values({ entryId: entry!.id, revision: 1, occurredAt: entry!.occurredAt, data: entry!.data, authorId: values.authorId })
  return entry!
}

/** A death makes the fish deceased; a death entered in error makes it alive again unless another death stands. */
export async function syncDeathStatus(tx: Tx, fish: FishRow, userId: string, deceased: boolean) {
  const [current] = await tx.select({ status: schema.fish.status, version: schema.fish.version }).from(schema.fish).where(eq(schema.fish.id, fish.id))
  if (!current) return
  const to = deceased ? 'deceased' : 'alive'
  if (deceased ? current.status === 'deceased' : current.status !== 'deceased') return
  await tx.update(schema.fish).set({ status: to, version: current.version + 1, updatedAt: new Date() }).where(eq(schema.fish.id, fish.id))
  await tx.insert(schema.fishEdits).values({ fishId: fish.id, userId, changes: [{ field: 'status', from: current.status, to }] })
}

export async function lockFish(tx: Tx, fishId: string) {
  await tx.execute(sql`select id from fish where id = ${fishId} for update`)
}

// ---- answers ------------------------------------------------------------------------------------

interface ViewContext { species: string, userId: string, role: PondRole }

function derivedFor(row: TimelineRow, species: string): EntryDerived {
  const { kind, data } = row
  if (kind === 'measurement') return measurementDerived(data as Parameters<typeof measurementDerived>[0], species)
  if (kind === 'anaesthesia') return { prolongedRecovery: isProlongedRecovery(data.recoveryMinutes as number | undefined) }
  if (kind === 'lab_result') return { analyteFlags: ((data.analytes ?? []) as { value: number, low?: number, high?: number }[]).map(analyteFlag) }
  if (kind === 'treatment') {
    return {
      treatmentLastDay: treatmentLastDay(data as Parameters<typeof treatmentLastDay>[0]),
      schedule: treatmentSchedule(data, new Date(row.occurred_at).toISOString(), (row.doses ?? []).map((d): GivenDose => ({ ...d, givenAt: new Date(d.givenAt).toISOString() }))),
    }
  }
  return {}
}

function canAmend(row: TimelineRow, context: ViewContext) {
  const { kind, author_id: authorId, data } = row
  // Photos and pond events are changed where they are made; an imported entry has no local author, so only the owner rules apply.
  if (row.entered_in_error || (!authorId && !row.imported_author_name) || !isEntryKind(kind)) return false
  return amendDecision({ userId: context.userId, role: context.role }, { authorId: authorId ?? '', kind, data }).allowed
}

function importedOf(row: TimelineRow): ImportedAuthorship | null {
  if (row.imported_author_name == null) return null
  return {
    name: row.imported_author_name, role: row.imported_author_role, archiveMadeAt: new Date(row.imported_exported_at!).toISOString(),
    importedBy: row.imported_by_name ?? '', importedAt: new Date(row.imported_at!).toISOString(),
  }
}

/**
 * An entry as the timeline answers it. `kind` also names the photos and pond events shown beside the entries;
 * `author` is null for an imported entry (see `imported`); `viewpoint` is 'related' for a companion note written on
 * the other fish (`otherFish`) and shown here too; `canAmend` says whether the person asking may amend it.
 */
export function rowToView(row: TimelineRow, context: ViewContext) {
  const isPhoto = row.kind === 'photo'
  return {
    id: row.id,
    kind: row.kind,
    occurredAt: new Date(row.occurred_at).toISOString(),
    author: row.author_id ? { id: row.author_id, name: row.author_name ?? '' } : null,
    imported: importedOf(row),
    data: row.data,
    revision: row.revision,
    enteredInError: row.entered_in_error,
    errorReason: row.error_reason,
    errorBy: row.error_by_name,
    errorAt: row.error_at ? new Date(row.error_at).toISOString() : null,
    viewpoint: row.viewpoint,
    otherFish: row.other_fish_id ? { id: row.other_fish_id, name: row.other_fish_name ?? '' } : null,
    linkedEntryId: row.linked_entry_id,
    photo: isPhoto ? { id: row.id, caption: String(row.data.caption ?? ''), view: String(row.data.view ?? 'other') } : null,
    derived: derivedFor(row, context.species),
    canAmend: row.viewpoint === 'subject' && canAmend(row, context),
    createdAt: new Date(row.created_at).toISOString(),
  }
}

/** The answer for an entry just written or changed, read back the same way the timeline reads it. */
export async function entryView(entryId: string, context: ViewContext) {
  const result = await useDb().execute<TimelineRow>(sql`
    select e.id, e.kind::text as kind, e.occurred_at, e.author_id, e.data, e.revision, e.entered_in_error,
      e.error_reason, e.error_at, 'subject' as viewpoint, e.related_fish_id as other_fish_id, ${AUTHOR_COLUMNS},
      other.name as other_fish_name, e.linked_entry_id, e.photo_id, e.created_at, '' as cursor_at, ${dosesOf(sql`e`)} as doses
    from timeline_entries e
    ${authorJoins(sql`e`)}
    left join fish other on other.id = e.related_fish_id
    where e.id = ${entryId}`)
  return rowToView(result.rows[0]!, context)
}

export function encodeCursor(row: { cursor_at: string, id: string }) {
  return Buffer.from(`${row.cursor_at}|${row.id}`).toString('base64url')
}

export function decodeCursor(cursor: string | undefined, field = 'before') {
  if (!cursor) return null
  const [at, id] = Buffer.from(cursor, 'base64url').toString('utf8').split('|')
  const wellFormed = at && id && /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{6}Z$/.test(at) && /^[0-9a-f-]{36}$/i.test(id)
  if (!wellFormed) throw badEntry({ [field]: ['Not a page marker from this timeline'] })
  return { at, id }
}
