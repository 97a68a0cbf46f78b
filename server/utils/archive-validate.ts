import { createHash } from 'node:crypto'
import type { Entry, ZipFile } from 'yauzl'
import type { z } from 'zod'
import { ARCHIVE_LIMITS, DATA_FILES, manifestSchema, RECORD_SCHEMAS, type ArchiveManifest, type DataFile } from '#shared/utils/archive-schema'

const ALLOWED_NAME = /^(manifest\.json|data\/[a-z-]+\.jsonl|csv\/[a-z-]+\.csv|photos\/[0-9a-f-]{36}\.(jpg|png|webp))$/

export interface ValidatedArchive {
  manifest: ArchiveManifest
  entries: Map<string, Entry>
}

function checkEntries(entries: Entry[]) {
  if (entries.length > ARCHIVE_LIMITS.entries) throw archiveRefused(`it holds ${entries.length} files, more than ${ARCHIVE_LIMITS.entries}`)
  const byName = new Map<string, Entry>()
  let total = 0
  for (const entry of entries) {
    const name = entry.fileName
    if (name.endsWith('/')) continue
    if (!ALLOWED_NAME.test(name)) throw archiveRefused(`it contains "${name.slice(0, 120)}", which is not part of a pond archive`)
    if (byName.has(name)) throw archiveRefused(`"${name}" appears twice`)
    const limit = name.startsWith('photos/') ? ARCHIVE_LIMITS.photoBytes : ARCHIVE_LIMITS.dataFileBytes
    if (entry.uncompressedSize > limit) throw archiveRefused(`"${name}" unpacks to ${entry.uncompressedSize} bytes, more than the ${limit} allowed`)
    if (entry.uncompressedSize > 1024 * 1024 && entry.uncompressedSize > entry.compressedSize * ARCHIVE_LIMITS.compressionRatio) {
      throw archiveRefused(`"${name}" is compressed more than ${ARCHIVE_LIMITS.compressionRatio} to 1, as a zip bomb is`)
    }
    total += entry.uncompressedSize
    byName.set(name, entry)
  }
  if (total > ARCHIVE_LIMITS.totalUnpackedBytes) throw archiveRefused(`it unpacks to ${total} bytes in all, more than ${ARCHIVE_LIMITS.totalUnpackedBytes}`)
  return byName
}

async function readManifest(zip: ZipFile, entry: Entry | undefined) {
  if (!entry) throw archiveRefused('manifest.json is missing')
  let text = ''
  for await (const line of entryLines(zip, entry, ARCHIVE_LIMITS.lineBytes)) text += `${line}\n`
  let json: unknown
  try {
    json = JSON.parse(text)
  }
  catch {
    throw archiveRefused('manifest.json is not valid JSON')
  }
  const parsed = manifestSchema.safeParse(json)
  if (!parsed.success) throw archiveRefused(`manifest.json: ${parsed.error.issues.map(i => `${i.path.join('.') || 'document'}: ${i.message}`).join('; ')}`)
  return parsed.data
}

/** Streams one data file: checks its checksum and line count against the manifest and every record against its schema. */
export async function* archiveRecords<F extends DataFile>(zip: ZipFile, archive: ValidatedArchive, file: F): AsyncGenerator<z.infer<typeof RECORD_SCHEMAS[F]>> {
  const name = `data/${file}.jsonl`
  const entry = archive.entries.get(name)
  const expected = archive.manifest.files[name]
  if (!entry || !expected) throw archiveRefused(`${name} is missing`)
  const hash = createHash('sha256')
  let lineNumber = 0
  for await (const line of entryLines(zip, entry, ARCHIVE_LIMITS.lineBytes)) {
    hash.update(`${line}\n`)
    lineNumber++
    let json: unknown
    try {
      json = JSON.parse(line)
    }
    catch {
      throw archiveRefused(`${name} line ${lineNumber} is not valid JSON`)
    }
    const parsed = RECORD_SCHEMAS[file].safeParse(json)
    if (!parsed.success) throw archiveRefused(`${name} line ${lineNumber}: ${parsed.error.issues.slice(0, 3).map(i => `${i.path.join('.') || 'record'}: ${i.message}`).join('; ')}`)
    yield parsed.data as z.infer<typeof RECORD_SCHEMAS[F]>
  }
  if (lineNumber !== expected.lines) throw archiveRefused(`${name} has ${lineNumber} records where the manifest says ${expected.lines}`)
  if (hash.digest('hex') !== expected.sha256) throw archiveRefused(`${name} does not match its checksum in the manifest`)
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
    if ((error as { statusCode?: number }).statusCode) throw error
    throw archiveRefused(`${entry.fileName} is damaged (${(error as Error).message})`)
  }
  return { sha256: hash.digest('hex'), bytes }
}

/**
 * Reads the whole archive once before anything is written: names, sizes, the manifest, every record against
 * its schema and the references between records, and every photo against its checksum.
 */
export async function validateArchive(zip: ZipFile): Promise<ValidatedArchive> {
  const entries = checkEntries(await listEntries(zip))
  const manifest = await readManifest(zip, entries.get('manifest.json'))
  const archive = { manifest, entries }
  for (const file of DATA_FILES) if (!manifest.files[`data/${file}.jsonl`]) throw archiveRefused(`the manifest does not list data/${file}.jsonl`)

  const people = new Set<string>()
  for await (const person of archiveRecords(zip, archive, 'people')) people.add(person.ref)
  const known = (ref: string | null, what: string) => {
    if (ref !== null && !people.has(ref)) throw archiveRefused(`${what} names a person who is not in data/people.jsonl`)
  }
  const photos = new Set<string>()
  for await (const photo of archiveRecords(zip, archive, 'photos')) {
    const entry = entries.get(photo.file)
    if (!entry) throw archiveRefused(`${photo.file} is listed but not in the archive`)
    known(photo.uploader, `photo ${photo.id}`)
    const actual = await photoChecksum(zip, entry)
    if (actual.sha256 !== photo.sha256 || actual.bytes !== photo.bytes) throw archiveRefused(`${photo.file} does not match its checksum`)
    photos.add(photo.id)
  }
  const fish = new Set<string>()
  for await (const f of archiveRecords(zip, archive, 'fish')) {
    if (f.profilePhotoId && !photos.has(f.profilePhotoId)) throw archiveRefused(`fish "${f.name}" has a profile photo that is not in the archive`)
    fish.add(f.id)
  }
  for await (const edit of archiveRecords(zip, archive, 'fish-edits')) {
    if (!fish.has(edit.fishId)) throw archiveRefused('a profile change names a fish that is not in the archive')
    known(edit.by, 'a profile change')
  }
  for await (const entry of archiveRecords(zip, archive, 'timeline')) {
    if (!fish.has(entry.fishId) || (entry.relatedFishId && !fish.has(entry.relatedFishId))) throw archiveRefused(`timeline entry ${entry.id} names a fish that is not in the archive`)
    if (entry.photoId && !photos.has(entry.photoId)) throw archiveRefused(`timeline entry ${entry.id} names a photo that is not in the archive`)
    known(entry.author, `timeline entry ${entry.id}`)
    known(entry.errorBy, `timeline entry ${entry.id}`)
    for (const revision of entry.revisions) known(revision.author, `a revision of timeline entry ${entry.id}`)
    for (const dose of entry.doses ?? []) known(dose.givenBy, `a dose of timeline entry ${entry.id}`)
  }
  const counted = { people: people.size, fish: fish.size, photos: photos.size }
  for (const [key, value] of Object.entries(counted)) {
    if (manifest.counts[key as keyof typeof counted] !== value) throw archiveRefused(`the manifest counts ${manifest.counts[key as keyof typeof counted]} ${key} but the archive holds ${value}`)
  }
  return archive
}
