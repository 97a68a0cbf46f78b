import { createHash } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { Readable, type Writable } from 'node:stream'
import { stringify } from 'csv-stringify'
import { ZipFile } from 'yazl'
import { ARCHIVE_FORMAT, ARCHIVE_SCHEMA_VERSION, type ArchiveManifest, type ArchiveRecord, type DataFile } from '#shared/utils/archive-schema'

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

async function* people(pondId: string): AsyncGenerator<ArchiveRecord<'people'>> {
  const { rows } = await usePool().query(`
    select u.id, u.name, u.email from users u where u.id in (
      select e.author_id from timeline_entries e join fish f on f.id = e.fish_id where f.pond_id = $1
      union select e.error_by_id from timeline_entries e join fish f on f.id = e.fish_id where f.pond_id = $1
      union select r.author_id from timeline_revisions r join timeline_entries e on e.id = r.entry_id join fish f on f.id = e.fish_id where f.pond_id = $1
      union select x.user_id from fish_edits x join fish f on f.id = x.fish_id where f.pond_id = $1
      union select p.uploader_id from photos p join fish f on f.id = p.fish_id where f.pond_id = $1
      union select d.given_by_id from treatment_doses d join timeline_entries e on e.id = d.entry_id join fish f on f.id = e.fish_id where f.pond_id = $1
    ) order by u.id`, [pondId])
  for (const u of rows) yield { ref: u.id, name: u.name, email: u.email, role: null }
}

async function* fishRecords(pondId: string): AsyncGenerator<ArchiveRecord<'fish'>> {
  for await (const rows of batches(fishQuery, [pondId])) {
    for (const f of rows) {
      yield {
        id: f.id as string, name: f.name as string, species: f.species as 'koi', scientificName: f.scientific_name as string, variety: f.variety as string,
        sex: f.sex as 'unknown', hatchYear: f.hatch_year as number | null, hatchYearEstimated: f.hatch_year_estimated as boolean,
        acquiredOn: f.acquired_on as string | null, acquiredFrom: f.acquired_from as string, microchip: f.microchip as string | null,
        features: f.features as string, status: f.status as 'alive', profilePhotoId: f.profile_photo_id as string | null,
        createdAt: iso(f.created_at)!, updatedAt: iso(f.updated_at)!,
      }
    }
  }
}

async function* editRecords(pondId: string): AsyncGenerator<ArchiveRecord<'fish-edits'>> {
  for await (const rows of batches(editsQuery, [pondId])) {
    for (const e of rows) yield { fishId: e.fish_id as string, by: e.user_id as string, createdAt: iso(e.created_at)!, changes: e.changes as ArchiveRecord<'fish-edits'>['changes'] }
  }
}

/** Entries fish by fish (their index order), a few fish at a time, each batch with its revisions. */
async function* timelineRecords(pondId: string): AsyncGenerator<ArchiveRecord<'timeline'>> {
  // Ten fish hold a few thousand entries even after twenty years of monthly weighing.
  for await (const fishRows of batches('select t.id from fish t where t.pond_id = $1', [pondId], 10)) {
    const { rows } = await usePool().query('select * from timeline_entries where fish_id = any($1) order by fish_id, occurred_at, id', [fishRows.map(f => f.id)])
    for (let start = 0; start < rows.length; start += BATCH) {
      const slice = rows.slice(start, start + BATCH)
      const { rows: revisions } = await usePool().query('select * from timeline_revisions where entry_id = any($1) order by entry_id, revision', [slice.map(r => r.id)])
      const byEntry = groupBy(revisions)
      const { rows: doses } = await usePool().query('select * from treatment_doses where entry_id = any($1) order by entry_id, dose_number', [slice.map(r => r.id)])
      const dosesByEntry = groupBy(doses)
      for (const e of slice) yield timelineRecord(e, byEntry.get(e.id as string) ?? [], dosesByEntry.get(e.id as string) ?? [])
    }
  }
}

function timelineRecord(e: Row, revisions: Row[], doses: Row[]): ArchiveRecord<'timeline'> {
  return {
    id: e.id as string, fishId: e.fish_id as string, kind: e.kind as 'measurement', occurredAt: iso(e.occurred_at)!, author: e.author_id as string,
    relatedFishId: e.related_fish_id as string | null, linkedEntryId: e.linked_entry_id as string | null, photoId: e.photo_id as string | null,
    data: e.data as Record<string, unknown>, revision: e.revision as number, enteredInError: e.entered_in_error as boolean,
    errorReason: e.error_reason as string | null, errorBy: e.error_by_id as string | null, errorAt: iso(e.error_at), createdAt: iso(e.created_at)!,
    revisions: revisions.map(r => ({
      revision: r.revision as number, occurredAt: iso(r.occurred_at)!, data: r.data as Record<string, unknown>,
      author: r.author_id as string, reason: r.reason as string | null, createdAt: iso(r.created_at)!,
    })),
    ...(doses.length
      ? { doses: doses.map(d => ({ doseNumber: d.dose_number as number, givenAt: iso(d.given_at)!, givenBy: d.given_by_id as string, note: d.note as string, createdAt: iso(d.created_at)! })) }
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

async function* photoRecords(pondId: string): AsyncGenerator<ArchiveRecord<'photos'>> {
  for await (const rows of batches(photosQuery, [pondId])) {
    for (const p of rows) {
      yield {
        id: p.id as string, fishId: p.fish_id as string, uploader: p.uploader_id as string, originalName: p.original_name as string,
        view: p.view as 'top', caption: p.caption as string, takenAt: iso(p.taken_at), createdAt: iso(p.created_at)!, removedAt: null,
        mime: p.mime as 'image/jpeg', bytes: p.bytes as number, sha256: p.sha256 as string, file: `photos/${p.id}.${EXTENSIONS[p.mime as string] ?? 'jpg'}`,
      }
    }
  }
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

function csv<T>(records: AsyncIterable<T>, columns: string[], row: (record: T) => unknown[]) {
  const out = stringify({ header: true, columns })
  void (async () => {
    try {
      for await (const record of records) {
        if (!out.write(row(record))) await new Promise(done => out.once('drain', done))
      }
      out.end()
    }
    catch (error) {
      out.destroy(error as Error)
    }
  })()
  return out
}

const summary = (data: Record<string, unknown>) => JSON.stringify(data)

/** Streams the whole pond as a ZIP into `output`; resolves when the last byte is written. */
export async function writePondArchive(pondId: string, output: Writable) {
  const [pond] = (await usePool().query('select * from ponds where id = $1', [pondId])).rows
  if (!pond) throw createError({ statusCode: 404, statusMessage: 'Pond not found' })
  const zip = new ZipFile()
  const done = new Promise<void>((resolve, reject) => {
    output.on('finish', resolve).on('close', resolve).on('error', reject)
    zip.outputStream.on('error', reject)
  })
  zip.outputStream.pipe(output)
  const files: ArchiveManifest['files'] = {}
  const sources: Record<DataFile, () => AsyncIterable<unknown>> = {
    'people': () => people(pondId),
    'fish': () => fishRecords(pondId),
    'fish-edits': () => editRecords(pondId),
    'timeline': () => timelineRecords(pondId),
    'photos': () => photoRecords(pondId),
  }
  for (const [name, source] of Object.entries(sources)) {
    const stats = files[`data/${name}.jsonl`] = { sha256: '', lines: 0, bytes: 0 }
    zip.addReadStreamLazy(`data/${name}.jsonl`, cb => cb(null, jsonLines(source(), stats)))
  }
  zip.addReadStreamLazy('csv/fish.csv', cb => cb(null, csv(fishRecords(pondId), ['name', 'species', 'scientific_name', 'variety', 'sex', 'hatch_year', 'hatch_year_estimated', 'microchip', 'status', 'acquired_on', 'acquired_from', 'features'],
    f => [f.name, f.species, f.scientificName, f.variety, f.sex, f.hatchYear, f.hatchYearEstimated, f.microchip, f.status, f.acquiredOn, f.acquiredFrom, f.features])))
  zip.addReadStreamLazy('csv/timeline.csv', cb => cb(null, csv(timelineRecords(pondId), ['occurred_at', 'fish_id', 'kind', 'weight_g', 'length_cm', 'length_type', 'entered_in_error', 'revision', 'details'],
    e => [e.occurredAt, e.fishId, e.kind, e.data.weightG ?? '', e.data.lengthCm ?? '', e.data.lengthType ?? '', e.enteredInError, e.revision, summary(e.data)])))
  zip.addReadStreamLazy('csv/photos.csv', cb => cb(null, csv(photoRecords(pondId), ['file', 'fish_id', 'view', 'caption', 'taken_at', 'sha256'],
    p => [p.file, p.fishId, p.view, p.caption, p.takenAt, p.sha256])))
  const counts = { people: 0, fish: 0, fishEdits: 0, timeline: 0, photos: 0 }
  for await (const photo of photoRecords(pondId)) {
    // Originals are already compressed; storing them saves time and keeps the entry sizes honest.
    zip.addReadStreamLazy(photo.file, { compress: false, size: photo.bytes }, cb => cb(null, createReadStream(originalPath(photo.id))))
  }
  // yazl writes entries one after another in the order added, so the manifest (last) sees what the streams counted.
  const manifestStream = () => Readable.from((async function* () {
    counts.people = files['data/people.jsonl']!.lines
    counts.fish = files['data/fish.jsonl']!.lines
    counts.fishEdits = files['data/fish-edits.jsonl']!.lines
    counts.timeline = files['data/timeline.jsonl']!.lines
    counts.photos = files['data/photos.jsonl']!.lines
    const manifest: ArchiveManifest = {
      format: ARCHIVE_FORMAT, schemaVersion: ARCHIVE_SCHEMA_VERSION, exportedAt: new Date().toISOString(),
      pond: { id: pond.id, name: pond.name, volumeLitres: pond.volume_litres == null ? null : Number(pond.volume_litres), notes: pond.notes, createdAt: iso(pond.created_at)! },
      files, counts,
    }
    yield JSON.stringify(manifest, null, 2)
  })())
  zip.addReadStreamLazy('manifest.json', cb => cb(null, manifestStream()))
  zip.end()
  await done
}
