// Reading a pond archive: its names and sizes, the manifest, and every record against the schema a
// live write uses. `checkArchive` (in the upload worker) reads it all once and lists the first problems;
// the import then streams the same records again through `archiveRecords` to write them.
// No Nitro auto-imports here.
import { createHash } from 'node:crypto'
import { createInterface } from 'node:readline'
import type { Entry, ZipFile } from 'yauzl'
import type { z } from 'zod'
import { ARCHIVE_LIMITS, checkEntryData, DATA_FILES, manifestSchema, RECORD_SCHEMAS, type ArchiveManifest, type DataFile } from '../../shared/utils/archive-schema'
import { upgradeEntryData } from '../../shared/utils/timeline-upgrade'
import { entryStream, openZipFile, streamRefusal, UploadRefusal, type OpenedZip, type UploadProblem } from './zip-reader'

const ALLOWED_NAME = /^(manifest\.json|data\/[a-z-]+\.jsonl|csv\/[a-z-]+\.csv|photos\/[0-9a-f-]{36}\.(jpg|png|webp))$/

export interface OpenedArchive extends OpenedZip {
  manifest: ArchiveManifest
  byName: Map<string, Entry>
}

function refuse(reason: string, status = 400, problems: UploadProblem[] = []) {
  return new UploadRefusal(reason, { status, field: 'archive', problems })
}

function checkNames(entries: Entry[]) {
  const byName = new Map<string, Entry>()
  for (const entry of entries) {
    const name = entry.fileName
    if (name.endsWith('/')) continue
    if (!ALLOWED_NAME.test(name)) throw refuse(`it contains "${name.slice(0, 120)}", which is not part of a pond archive`)
    if (byName.has(name)) throw refuse(`"${name}" appears twice`)
    const limit = name === 'manifest.json' ? ARCHIVE_LIMITS.manifestBytes : name.startsWith('photos/') ? ARCHIVE_LIMITS.photoBytes : ARCHIVE_LIMITS.dataFileBytes
    if (entry.uncompressedSize > limit) throw refuse(`"${name}" unpacks to ${entry.uncompressedSize} bytes, more than the ${limit} allowed`, 413)
    if (entry.uncompressedSize > 1024 * 1024 && entry.uncompressedSize > entry.compressedSize * ARCHIVE_LIMITS.compressionRatio) {
      throw refuse(`"${name}" is compressed more than ${ARCHIVE_LIMITS.compressionRatio} to 1, as a zip bomb is`)
    }
    byName.set(name, entry)
  }
  return byName
}

/** The lines of a text entry, refusing any single line longer than `maxLineBytes` before it is all in memory. */
async function* entryLines(zip: ZipFile, entry: Entry, maxLineBytes: number): AsyncGenerator<string> {
  const stream = await entryStream(zip, entry)
  // readline would gather an endless line whole; this cuts the stream as soon as a line grows too long.
  let pending = 0
  stream.on('data', (chunk: Buffer) => {
    const firstBreak = chunk.indexOf(0x0A)
    if (firstBreak < 0) pending += chunk.length
    else if (pending + firstBreak <= maxLineBytes) pending = chunk.length - chunk.lastIndexOf(0x0A) - 1
    else pending = maxLineBytes + 1
    if (pending > maxLineBytes) stream.destroy(refuse(`${entry.fileName} has a line longer than ${maxLineBytes} bytes`, 413))
  })
  const lines = createInterface({ input: stream, crlfDelay: Infinity })
  try {
    for await (const line of lines) {
      if (Buffer.byteLength(line) > maxLineBytes) throw refuse(`${entry.fileName} has a line longer than ${maxLineBytes} bytes`, 413)
      yield line
    }
  }
  catch (error) {
    throw error instanceof UploadRefusal ? error : streamRefusal(entry, error)
  }
  finally {
    stream.destroy()
  }
}

async function readManifest(zip: ZipFile, entry: Entry | undefined) {
  if (!entry) throw refuse('manifest.json is missing')
  let text = ''
  for await (const line of entryLines(zip, entry, ARCHIVE_LIMITS.manifestBytes)) {
    text += `${line}\n`
    if (text.length > ARCHIVE_LIMITS.manifestBytes) throw refuse(`manifest.json is larger than ${ARCHIVE_LIMITS.manifestBytes} bytes`, 413)
  }
  let json: unknown
  try {
    json = JSON.parse(text)
  }
  catch {
    throw refuse('manifest.json is not valid JSON')
  }
  const parsed = manifestSchema.safeParse(json)
  if (!parsed.success) throw refuse(`manifest.json: ${parsed.error.issues.map(i => `${i.path.join('.') || 'document'}: ${i.message}`).join('; ')}`)
  return parsed.data
}

/** Opens an archive on disk: names, sizes, the local/central check, and the manifest. */
export async function openArchive(path: string): Promise<OpenedArchive> {
  const opened = await openZipFile(path, { maxEntries: ARCHIVE_LIMITS.entries, maxEntryBytes: ARCHIVE_LIMITS.dataFileBytes, maxTotalBytes: ARCHIVE_LIMITS.totalUnpackedBytes })
    .catch((error) => {
      throw error instanceof UploadRefusal ? refuse(error.message, error.status) : error
    })
  try {
    const byName = checkNames(opened.entries)
    const manifest = await readManifest(opened.zip, byName.get('manifest.json'))
    for (const file of DATA_FILES) if (!manifest.files[`data/${file}.jsonl`]) throw refuse(`the manifest does not list data/${file}.jsonl`)
    return { ...opened, manifest, byName }
  }
  catch (error) {
    await opened.close()
    throw error
  }
}

export type RecordOf<F extends DataFile> = z.output<typeof RECORD_SCHEMAS[F]>

/** One record read, or the problems found in its line. */
export type ReadRecord<F extends DataFile> = { line: number, record: RecordOf<F>, problems?: undefined } | { line: number, record?: undefined, problems: UploadProblem[] }

/**
 * Streams one data file: checks its checksum and line count against the manifest, and every record
 * against its schema (a timeline entry's data against its kind's). Problems are yielded, not thrown,
 * so the check can list several before refusing.
 */
export async function* archiveRecords<F extends DataFile>(archive: OpenedArchive, file: F, roles?: Map<string, RecordOf<'people'>['role']>): AsyncGenerator<ReadRecord<F>> {
  const name = `data/${file}.jsonl`
  const entry = archive.byName.get(name)
  const expected = archive.manifest.files[name]
  if (!entry || !expected) throw refuse(`${name} is missing`)
  const hash = createHash('sha256')
  let line = 0
  for await (const text of entryLines(archive.zip, entry, ARCHIVE_LIMITS.lineBytes)) {
    hash.update(`${text}\n`)
    line++
    let json: unknown
    try {
      json = JSON.parse(text)
    }
    catch {
      yield { line, problems: [{ file: name, line, message: 'not valid JSON' }] }
      continue
    }
    const parsed = RECORD_SCHEMAS[file].safeParse(json)
    if (!parsed.success) {
      yield { line, problems: parsed.error.issues.slice(0, 5).map(i => ({ file: name, line, field: i.path.join('.') || 'record', message: i.message })) }
      continue
    }
    const record = parsed.data as RecordOf<F>
    if (file === 'timeline') {
      const entryRecord = record as RecordOf<'timeline'>
      const problems: UploadProblem[] = []
      entryRecord.revisions.forEach((revision, i) => {
        // An entry from before a form changed is checked as the import leaves it: upgraded, as
        // upgradeLegacyEntries then writes it in a new revision.
        const data = upgradeEntryData(entryRecord.kind, revision.data) ?? revision.data
        const checked = checkEntryData(entryRecord.kind, data, roles?.get(revision.author) ?? null)
        if (!checked.ok) problems.push(...checked.problems.map(p => ({ file: name, line, field: `revisions.${i}.${p.field}`, message: p.message })))
      })
      if (problems.length) {
        yield { line, problems: problems.slice(0, 5) }
        continue
      }
    }
    yield { line, record }
  }
  if (line !== expected.lines) yield { line, problems: [{ file: name, message: `${line} records where the manifest says ${expected.lines}` }] }
  if (hash.digest('hex') !== expected.sha256) yield { line, problems: [{ file: name, message: 'does not match its checksum in the manifest' }] }
}

async function photoChecksum(zip: ZipFile, entry: Entry) {
  const hash = createHash('sha256')
  let bytes = 0
  try {
    for await (const chunk of await entryStream(zip, entry)) {
      hash.update(chunk as Buffer)
      bytes += (chunk as Buffer).length
    }
  }
  catch (error) {
    throw streamRefusal(entry, error)
  }
  return { sha256: hash.digest('hex'), bytes }
}

/**
 * Reads the whole archive once before anything is written: every record against its schema and the
 * references between records, every photo against its checksum. Refuses with the first problems
 * (file, line, field) when any record fails.
 */
export async function checkArchive(path: string): Promise<{ manifest: ArchiveManifest }> {
  const archive = await openArchive(path)
  const problems: UploadProblem[] = []
  const note = (...found: UploadProblem[]) => {
    problems.push(...found)
    if (problems.length >= ARCHIVE_LIMITS.problemsListed) throw tooMany()
  }
  const tooMany = () => refuse(`${problemSummary(problems)}`, 400, problems.slice(0, ARCHIVE_LIMITS.problemsListed))
  try {
    const people = new Map<string, RecordOf<'people'>['role']>()
    for await (const read of archiveRecords(archive, 'people')) {
      if (read.problems) note(...read.problems)
      else people.set(read.record.ref, read.record.role)
    }
    const known = (ref: string | null, file: string, line: number, field: string) => {
      if (ref !== null && !people.has(ref)) note({ file, line, field, message: 'names a person who is not in data/people.jsonl' })
    }
    const photos = new Set<string>()
    for await (const read of archiveRecords(archive, 'photos')) {
      if (read.problems) {
        note(...read.problems)
        continue
      }
      const photo = read.record
      const at = { file: 'data/photos.jsonl', line: read.line }
      const entry = archive.byName.get(photo.file)
      if (!entry) {
        note({ ...at, field: 'file', message: `${photo.file} is listed but not in the archive` })
        continue
      }
      known(photo.uploader, at.file, at.line, 'uploader')
      const actual = await photoChecksum(archive.zip, entry)
      if (actual.sha256 !== photo.sha256 || actual.bytes !== photo.bytes) note({ ...at, field: 'sha256', message: `${photo.file} does not match its checksum` })
      photos.add(photo.id)
    }
    const fish = new Set<string>()
    for await (const read of archiveRecords(archive, 'fish')) {
      if (read.problems) {
        note(...read.problems)
        continue
      }
      if (read.record.profilePhotoId && !photos.has(read.record.profilePhotoId)) note({ file: 'data/fish.jsonl', line: read.line, field: 'profilePhotoId', message: 'a profile photo that is not in the archive' })
      fish.add(read.record.id)
    }
    for await (const read of archiveRecords(archive, 'fish-edits')) {
      if (read.problems) {
        note(...read.problems)
        continue
      }
      if (!fish.has(read.record.fishId)) note({ file: 'data/fish-edits.jsonl', line: read.line, field: 'fishId', message: 'names a fish that is not in the archive' })
      known(read.record.by, 'data/fish-edits.jsonl', read.line, 'by')
    }
    for await (const read of archiveRecords(archive, 'timeline', people)) {
      if (read.problems) {
        note(...read.problems)
        continue
      }
      const entry = read.record
      const at = (field: string, message: string) => note({ file: 'data/timeline.jsonl', line: read.line, field, message })
      if (!fish.has(entry.fishId)) at('fishId', 'names a fish that is not in the archive')
      if (entry.relatedFishId && !fish.has(entry.relatedFishId)) at('relatedFishId', 'names a fish that is not in the archive')
      if (entry.photoId && !photos.has(entry.photoId)) at('photoId', 'names a photo that is not in the archive')
      known(entry.author, 'data/timeline.jsonl', read.line, 'author')
      known(entry.errorBy, 'data/timeline.jsonl', read.line, 'errorBy')
      entry.revisions.forEach((revision, i) => known(revision.author, 'data/timeline.jsonl', read.line, `revisions.${i}.author`))
    }
    if (problems.length) throw tooMany()
    const counted = { people: people.size, fish: fish.size, photos: photos.size }
    for (const [key, value] of Object.entries(counted)) {
      if (archive.manifest.counts[key as keyof typeof counted] !== value) throw refuse(`the manifest counts ${archive.manifest.counts[key as keyof typeof counted]} ${key} but the archive holds ${value}`)
    }
    return { manifest: archive.manifest }
  }
  finally {
    await archive.close()
  }
}

/** "data/fish.jsonl line 3: species: Invalid option …" for the first problems, in one sentence. */
export function problemSummary(problems: UploadProblem[]) {
  const shown = problems.slice(0, 3).map(p => `${p.file}${p.line ? ` line ${p.line}` : ''}: ${p.field ? `${p.field}: ` : ''}${p.message}`).join('; ')
  return problems.length > 3 ? `${shown}; and more (${problems.length >= ARCHIVE_LIMITS.problemsListed ? `at least ${problems.length}` : problems.length} problems)` : shown
}
