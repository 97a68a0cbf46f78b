import { createHash } from 'node:crypto'
import { Readable, type Writable } from 'node:stream'
import { ZipFile } from 'yazl'
import { ARCHIVE_FORMAT, ARCHIVE_LIMITS, ARCHIVE_SCHEMA_VERSION, type ArchiveManifest, type ArchiveRecord, type DataFile, type MissingPhoto } from '#shared/utils/archive-schema'
import { addCsvFiles, type ArchiveIndex } from './archive-csv-files'
import { withoutLocation } from './photo-location'
import { originalKey } from '../storage/file-storage'

const BATCH = 500
const EXTENSIONS: Record<string, string> = { 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp' }

type Row = Record<string, unknown>
const iso = (value: unknown) => (value == null ? null : new Date(value as string).toISOString())

/** Reads a query in keyset batches so memory stays flat however big the pond is. */
async function* batches(query: string, params: unknown[], size = BATCH): AsyncGenerator<Row[]> {
  let after = '00000000-0000-0000-0000-000000000000'
  for (;;) {
    const { rows } = await usePool().query(`${query} and t.id > $${params.length + 1} order by t.id limit ${size}`, [...params, after])
    if (!rows.length) return
    yield rows
    after = rows[rows.length - 1].id
  }
}

const fishQuery = 'select t.* from fish t where t.pond_id = $1'
const editsQuery = 'select t.* from fish_edits t join fish f on f.id = t.fish_id where f.pond_id = $1'
const photosQuery = `select t.* from photos t join fish f on f.id = t.fish_id where f.pond_id = $1 and t.state = 'ready' and t.removed_at is null`

/**
 * Everyone who wrote something in the pond's records, with their role in the pond today (null once they left
 * it); and, for a pond that was itself imported, the archive's people as that archive named them.
 */
async function* people(pondId: string): AsyncGenerator<ArchiveRecord<'people'>> {
  const { rows } = await usePool().query(`
    select u.id, u.name, u.email, (select m.role::text from memberships m where m.pond_id = $1 and m.user_id = u.id) as role from users u where u.id in (
      select e.author_id from timeline_entries e join fish f on f.id = e.fish_id where f.pond_id = $1
      union select e.error_by_id from timeline_entries e join fish f on f.id = e.fish_id where f.pond_id = $1
      union select r.author_id from timeline_revisions r join timeline_entries e on e.id = r.entry_id join fish f on f.id = e.fish_id where f.pond_id = $1
      union select x.user_id from fish_edits x join fish f on f.id = x.fish_id where f.pond_id = $1
      union select p.uploader_id from photos p join fish f on f.id = p.fish_id where f.pond_id = $1
      union select d.given_by_id from treatment_doses d join timeline_entries e on e.id = d.entry_id join fish f on f.id = e.fish_id where f.pond_id = $1
    )
    union all
    select a.id, a.name, a.email, a.role::text from archive_people a where a.id in (
      select e.imported_author_id from timeline_entries e join fish f on f.id = e.fish_id where f.pond_id = $1
      union select e.imported_error_by_id from timeline_entries e join fish f on f.id = e.fish_id where f.pond_id = $1
      union select r.imported_author_id from timeline_revisions r join timeline_entries e on e.id = r.entry_id join fish f on f.id = e.fish_id where f.pond_id = $1
      union select x.imported_author_id from fish_edits x join fish f on f.id = x.fish_id where f.pond_id = $1
      union select p.imported_uploader_id from photos p join fish f on f.id = p.fish_id where f.pond_id = $1
      union select d.imported_given_by_id from treatment_doses d join timeline_entries e on e.id = d.entry_id join fish f on f.id = e.fish_id where f.pond_id = $1
    )
    order by id`, [pondId])
  for (const u of rows) yield { ref: u.id, name: u.name, email: u.email, role: u.role }
}

/** A record's person: the local one, or the archive's person it was imported with. */
const personOf = (local: unknown, imported: unknown) => (local ?? imported) as string

async function* fishRecords(pondId: string, missing: ReadonlySet<string>): AsyncGenerator<ArchiveRecord<'fish'>> {
  for await (const rows of batches(fishQuery, [pondId])) {
    for (const f of rows) {
      yield {
        id: f.id as string, name: f.name as string, species: f.species as 'koi', scientificName: f.scientific_name as string, variety: f.variety as string,
        sex: f.sex as 'unknown', hatchYear: f.hatch_year as number | null, hatchYearEstimated: f.hatch_year_estimated as boolean,
        acquiredOn: f.acquired_on as string | null, acquiredFrom: f.acquired_from as string, microchip: f.microchip as string | null,
        features: f.features as string, status: f.status as 'alive', profilePhotoId: present(f.profile_photo_id as string | null, missing),
        createdAt: iso(f.created_at)!, updatedAt: iso(f.updated_at)!,
      }
    }
  }
}

async function* editRecords(pondId: string): AsyncGenerator<ArchiveRecord<'fish-edits'>> {
  for await (const rows of batches(editsQuery, [pondId])) {
    for (const e of rows) yield { fishId: e.fish_id as string, by: personOf(e.user_id, e.imported_author_id), createdAt: iso(e.created_at)!, changes: e.changes as ArchiveRecord<'fish-edits'>['changes'] }
  }
}

/** A photo left out of the archive is referred to by nobody in it. */
const present = (photoId: string | null, missing: ReadonlySet<string>) => (photoId && !missing.has(photoId) ? photoId : null)

/** Entries fish by fish (their index order), a few fish at a time, each batch with its revisions; of one kind when asked. */
async function* timelineRecords(pondId: string, missing: ReadonlySet<string>, kind?: string): AsyncGenerator<ArchiveRecord<'timeline'>> {
  // Ten fish hold a few thousand entries even after twenty years of monthly weighing.
  for await (const fishRows of batches('select t.id from fish t where t.pond_id = $1', [pondId], 10)) {
    const { rows } = kind
      ? await usePool().query('select * from timeline_entries where fish_id = any($1) and kind = $2 order by fish_id, occurred_at, id', [fishRows.map(f => f.id), kind])
      : await usePool().query('select * from timeline_entries where fish_id = any($1) order by fish_id, occurred_at, id', [fishRows.map(f => f.id)])
    for (let start = 0; start < rows.length; start += BATCH) {
      const slice = rows.slice(start, start + BATCH)
      const { rows: revisions } = await usePool().query('select * from timeline_revisions where entry_id = any($1) order by entry_id, revision', [slice.map(r => r.id)])
      const byEntry = groupBy(revisions)
      const { rows: doses } = await usePool().query('select * from treatment_doses where entry_id = any($1) order by entry_id, dose_number', [slice.map(r => r.id)])
      const dosesByEntry = groupBy(doses)
      for (const e of slice) yield timelineRecord(e, byEntry.get(e.id as string) ?? [], dosesByEntry.get(e.id as string) ?? [], missing)
    }
  }
}

function timelineRecord(e: Row, revisions: Row[], doses: Row[], missing: ReadonlySet<string>): ArchiveRecord<'timeline'> {
  return {
    id: e.id as string, fishId: e.fish_id as string, kind: e.kind as 'measurement', occurredAt: iso(e.occurred_at)!, author: personOf(e.author_id, e.imported_author_id),
    relatedFishId: e.related_fish_id as string | null, linkedEntryId: e.linked_entry_id as string | null, photoId: present(e.photo_id as string | null, missing),
    data: e.data as Record<string, unknown>, revision: e.revision as number, enteredInError: e.entered_in_error as boolean,
    errorReason: e.error_reason as string | null, errorBy: (e.error_by_id ?? e.imported_error_by_id ?? null) as string | null, errorAt: iso(e.error_at), createdAt: iso(e.created_at)!,
    revisions: revisions.map(r => ({
      revision: r.revision as number, occurredAt: iso(r.occurred_at)!, data: r.data as Record<string, unknown>,
      author: personOf(r.author_id, r.imported_author_id), reason: r.reason as string | null, createdAt: iso(r.created_at)!,
    })),
    ...(doses.length
      ? { doses: doses.map(d => ({ doseNumber: d.dose_number as number, givenAt: iso(d.given_at)!, givenBy: personOf(d.given_by_id, d.imported_given_by_id), note: d.note as string, createdAt: iso(d.created_at)! })) }
      : {}),
  }
}

// Node 20 has no Map.groupBy.
function groupBy(rows: Row[]) {
  const map = new Map<string, Row[]>()
  for (const row of rows) {
    const key = row.entry_id as string
    const list = map.get(key)
    if (list) list.push(row)
    else map.set(key, [row])
  }
  return map
}

/** JSON Lines from records, counting and hashing what passes through for the manifest. */
function jsonLines<T>(records: AsyncIterable<T>, stats: { sha256: string, lines: number, bytes: number }) {
  const hash = createHash('sha256')
  return Readable.from((async function* () {
    for await (const record of records) {
      const line = `${JSON.stringify(record)}\n`
      hash.update(line)
      stats.lines++
      stats.bytes += Buffer.byteLength(line)
      yield line
    }
    stats.sha256 = hash.digest('hex')
  })())
}

interface PhotoRow { id: string, fish_id: string, uploader_id: string | null, imported_uploader_id: string | null, original_name: string, view: string, caption: string, taken_at: Date | null, created_at: Date, mime: string }

const fileOf = (photo: PhotoRow) => `photos/${photo.id}.${EXTENSIONS[photo.mime] ?? 'jpg'}`

/** The bytes that go into the archive for a photo, and their checksum for its record. */
interface ExportedPhoto { sha256: string, bytes: number }

async function* photoRecords(pondId: string, exported: ReadonlyMap<string, ExportedPhoto>): AsyncGenerator<ArchiveRecord<'photos'>> {
  for await (const rows of batches(photosQuery, [pondId])) {
    for (const p of rows as unknown as PhotoRow[]) {
      const written = exported.get(p.id)
      if (!written) continue
      yield {
        id: p.id, fishId: p.fish_id, uploader: personOf(p.uploader_id, p.imported_uploader_id), originalName: p.original_name, view: p.view as 'top', caption: p.caption,
        takenAt: iso(p.taken_at), createdAt: iso(p.created_at)!, removedAt: null, mime: p.mime as 'image/jpeg', bytes: written.bytes, sha256: written.sha256, file: fileOf(p),
      }
    }
  }
}

export interface ArchiveOptions {
  /** Keep GPS and place names in the photo originals (off unless the owner asks). */
  keepLocation?: boolean
}

export const MISSING_PHOTO_NOTE = 'Its original file was not found in storage when the archive was made, so the photo is left out of this archive and nothing in it refers to the photo.'

/**
 * Adds every ready photo's original, first in the archive: each is read, has its location removed and is
 * hashed as yazl comes to it, so the photo records written after them carry the checksum of the bytes in
 * the archive. A photo whose original file is gone is left out and listed in `missing`, never waited for.
 */
async function addPhotos(zip: ZipFile, pondId: string, options: ArchiveOptions) {
  const exported = new Map<string, ExportedPhoto>()
  const missing: MissingPhoto[] = []
  for await (const rows of batches(photosQuery, [pondId])) {
    for (const photo of rows as unknown as PhotoRow[]) {
      const key = originalKey(photo.id)
      if (!(await useFileStorage().stat(key))) {
        missing.push({ id: photo.id, fishId: photo.fish_id, originalName: photo.original_name, note: MISSING_PHOTO_NOTE })
        continue
      }
      // Originals are already compressed; storing them saves time and keeps the entry sizes honest.
      zip.addReadStreamLazy(fileOf(photo), { compress: false }, (done) => {
        useFileStorage().readBuffer(key)
          .then(bytes => (options.keepLocation ? bytes : withoutLocation(bytes, photo.mime)))
          .then((bytes) => {
            exported.set(photo.id, { sha256: createHash('sha256').update(bytes).digest('hex'), bytes: bytes.length })
            done(null, Readable.from([bytes]))
          }, error => done(error as Error, undefined as unknown as Readable))
      })
    }
  }
  return { exported, missing }
}

/** The pond's fish and authors by id, for the CSV files' name, microchip and author columns. */
async function archiveIndex(pondId: string): Promise<ArchiveIndex> {
  const { rows } = await usePool().query('select id, name, microchip from fish where pond_id = $1', [pondId])
  const authors = new Map<string, { name: string, role: string | null }>()
  for await (const person of people(pondId)) authors.set(person.ref, { name: person.name, role: person.role })
  return { fish: new Map(rows.map(f => [f.id as string, { name: f.name as string, microchip: f.microchip as string | null }])), people: authors }
}

/** Streams the whole pond as a ZIP into `output`; resolves when the last byte is written, rejects on any failure. */
export async function writePondArchive(pondId: string, output: Writable, options: ArchiveOptions = {}) {
  const [pond] = (await usePool().query('select * from ponds where id = $1', [pondId])).rows
  if (!pond) throw createError({ statusCode: 404, statusMessage: 'Pond not found' })
  const zip = new ZipFile()
  const done = new Promise<void>((resolve, reject) => {
    output.on('finish', resolve).on('close', resolve).on('error', reject)
    // yazl reports a failed entry (a photo unreadable after all) on the ZipFile itself, not on its stream.
    zip.on('error', reject)
    zip.outputStream.on('error', reject)
  })
  zip.outputStream.pipe(output)
  const { exported, missing } = await addPhotos(zip, pondId, options)
  const missingIds = new Set(missing.map(p => p.id))
  const files: ArchiveManifest['files'] = {}
  const sources: Record<DataFile, () => AsyncIterable<unknown>> = {
    'people': () => people(pondId),
    'fish': () => fishRecords(pondId, missingIds),
    'fish-edits': () => editRecords(pondId),
    'timeline': () => timelineRecords(pondId, missingIds),
    'photos': () => photoRecords(pondId, exported),
  }
  for (const [name, source] of Object.entries(sources)) {
    const stats = files[`data/${name}.jsonl`] = { sha256: '', lines: 0, bytes: 0 }
    zip.addReadStreamLazy(`data/${name}.jsonl`, cb => cb(null, jsonLines(source(), stats)))
  }
  addCsvFiles(zip, await archiveIndex(pondId), {
    fish: () => fishRecords(pondId, missingIds),
    timeline: kind => timelineRecords(pondId, missingIds, kind),
    photos: () => photoRecords(pondId, exported),
  })
  // yazl writes entries one after another in the order added, so the manifest (last) sees what the streams counted.
  const manifestStream = () => Readable.from((async function* () {
    const lines = (file: DataFile) => files[`data/${file}.jsonl`]!.lines
    const manifest: ArchiveManifest = {
      format: ARCHIVE_FORMAT, schemaVersion: ARCHIVE_SCHEMA_VERSION, exportedAt: new Date().toISOString(),
      pond: { id: pond.id, name: pond.name, volumeLitres: pond.volume_litres == null ? null : Number(pond.volume_litres), notes: pond.notes, createdAt: iso(pond.created_at)! },
      files,
      counts: { people: lines('people'), fish: lines('fish'), fishEdits: lines('fish-edits'), timeline: lines('timeline'), photos: lines('photos') },
      photoLocation: options.keepLocation ? 'kept' : 'removed',
      missingPhotos: missing.slice(0, ARCHIVE_LIMITS.missingPhotosListed),
      missingPhotoCount: missing.length,
    }
    yield JSON.stringify(manifest, null, 2)
  })())
  zip.addReadStreamLazy('manifest.json', cb => cb(null, manifestStream()))
  zip.end()
  await done
}
