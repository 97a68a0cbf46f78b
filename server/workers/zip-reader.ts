// Reading ZIP files (spreadsheets and pond archives) through yauzl, with one check yauzl does not make:
// the local entries, walked from the first byte, must be exactly the central directory's entries, back to
// back. Readers that stream local headers (as spreadsheet libraries do) would otherwise unpack entries
// the directory never lists — a hidden entry can inflate to gigabytes.
// Runs in the upload worker; no Nitro auto-imports here.
import type { Readable } from 'node:stream'
import { open } from 'node:fs/promises'
import yauzl, { type Entry, type ZipFile } from 'yauzl'

/** Why a file is refused; `status` is the HTTP status the route answers with, `field` the form field it is about. */
export class UploadRefusal extends Error {
  readonly status: number
  readonly field: string
  readonly problems: UploadProblem[]
  constructor(message: string, options: { status?: number, field?: string, problems?: UploadProblem[] } = {}) {
    super(message)
    this.status = options.status ?? 400
    this.field = options.field ?? 'file'
    this.problems = options.problems ?? []
  }
}

export interface UploadProblem { file: string, line?: number, field?: string, message: string }

export interface ZipLimits { maxEntries: number, maxEntryBytes: number, maxTotalBytes: number }

type ReadAt = (offset: number, length: number) => Promise<Buffer>

export interface OpenedZip {
  zip: ZipFile
  entries: Entry[]
  close: () => Promise<void>
}

const LOCAL = 0x04034B50
const DESCRIPTOR = 0x08074B50
const ZIP64_EXTRA = 0x0001

// yauzl's own messages for names that would escape the folder they are unpacked into.
const UNSAFE_NAME = /absolute path|invalid relative path|invalid characters/

function yauzlOptions() {
  // validateEntrySizes fails a stream that unpacks to more or less than its entry declares;
  // strictFileNames refuses backslashes; yauzl refuses absolute paths and ".." (zip slip) itself.
  return { lazyEntries: true, autoClose: false, validateEntrySizes: true, strictFileNames: true, decodeStrings: true } as const
}

function listEntries(zip: ZipFile, limits: ZipLimits): Promise<Entry[]> {
  if (zip.entryCount > limits.maxEntries) throw new UploadRefusal(`it holds ${zip.entryCount} files; at most ${limits.maxEntries} are accepted`)
  return new Promise((resolve, reject) => {
    const entries: Entry[] = []
    let total = 0
    zip.on('entry', (entry: Entry) => {
      if (entry.uncompressedSize > limits.maxEntryBytes) return reject(new UploadRefusal(`"${entry.fileName}" unpacks to ${entry.uncompressedSize} bytes; at most ${limits.maxEntryBytes} are accepted`))
      total += entry.uncompressedSize
      if (total > limits.maxTotalBytes) return reject(new UploadRefusal(`it unpacks to more than ${limits.maxTotalBytes} bytes in all`, { status: 413 }))
      if (entry.generalPurposeBitFlag & 1) return reject(new UploadRefusal(`"${entry.fileName}" is encrypted`))
      if (entry.compressionMethod !== 0 && entry.compressionMethod !== 8) return reject(new UploadRefusal(`"${entry.fileName}" uses a compression method that is not accepted`))
      entries.push(entry)
      zip.readEntry()
    })
    zip.once('end', () => resolve(entries))
    zip.once('error', (error: Error) => reject(UNSAFE_NAME.test(error.message)
      ? new UploadRefusal(`"${error.message.replace(/^.*: /, '')}" points outside the archive (${error.message})`)
      : new UploadRefusal(`its table of contents is damaged (${error.message})`)))
    zip.readEntry()
  })
}

function extraField(extra: Buffer, id: number): Buffer | null {
  for (let at = 0; at + 4 <= extra.length;) {
    const length = extra.readUInt16LE(at + 2)
    if (extra.readUInt16LE(at) === id) return extra.subarray(at + 4, at + 4 + length)
    at += 4 + length
  }
  return null
}

/** The 64-bit sizes a local header keeps in its zip64 extra field when the 32-bit ones read 0xFFFFFFFF. */
function localSizes(extra: Buffer, size: number, compressedSize: number) {
  const zip64 = extraField(extra, ZIP64_EXTRA)
  if (!zip64) return { size, compressedSize }
  let at = 0
  const read = () => {
    const value = zip64.length >= at + 8 ? Number(zip64.readBigUInt64LE(at)) : -1
    at += 8
    return value
  }
  return { size: size === 0xFFFFFFFF ? read() : size, compressedSize: compressedSize === 0xFFFFFFFF ? read() : compressedSize }
}

/**
 * Walks the local headers from offset 0: each must be the next central-directory entry (same name, method,
 * CRC and sizes), its data and data descriptor must end where the next one starts, and the last must end
 * where the central directory starts. Anything else is an entry hidden from the directory, or a size that
 * says one thing locally and another centrally.
 */
async function checkLayout(entries: Entry[], centralDirectoryOffset: number, readAt: ReadAt) {
  const ordered = [...entries].sort((a, b) => a.relativeOffsetOfLocalHeader - b.relativeOffsetOfLocalHeader)
  let expected = 0
  for (const entry of ordered) {
    const name = entry.fileName
    if (entry.relativeOffsetOfLocalHeader !== expected) {
      throw new UploadRefusal(entry.relativeOffsetOfLocalHeader > expected
        ? `it holds data the table of contents does not list (before "${name}")`
        : `"${name}" overlaps another entry`)
    }
    const header = await readAt(expected, 30)
    if (header.length < 30 || header.readUInt32LE(0) !== LOCAL) throw new UploadRefusal(`"${name}" is damaged (no local header where the table of contents says)`)
    const flags = header.readUInt16LE(6)
    const nameLength = header.readUInt16LE(26)
    const extraLength = header.readUInt16LE(28)
    const tail = await readAt(expected + 30, nameLength + extraLength)
    if (!tail.subarray(0, nameLength).equals(entry.fileNameRaw)) throw new UploadRefusal(`"${name}" is named differently inside the archive than in its table of contents`)
    if (header.readUInt16LE(8) !== entry.compressionMethod) throw new UploadRefusal(`"${name}" declares two different compression methods`)
    const dataStart = expected + 30 + nameLength + extraLength
    let next = dataStart + entry.compressedSize
    if (flags & 0x08) {
      // Sizes and CRC follow the data in a descriptor (with or without its signature; 64-bit sizes for zip64).
      const descriptor = await readAt(next, 24)
      const signed = descriptor.length >= 4 && descriptor.readUInt32LE(0) === DESCRIPTOR ? 4 : 0
      const wide = extraField(tail.subarray(nameLength), ZIP64_EXTRA) !== null
      const length = signed + 4 + (wide ? 16 : 8)
      if (descriptor.length < length) throw new UploadRefusal(`"${name}" is cut short`)
      const crc = descriptor.readUInt32LE(signed)
      const compressedSize = wide ? Number(descriptor.readBigUInt64LE(signed + 4)) : descriptor.readUInt32LE(signed + 4)
      const size = wide ? Number(descriptor.readBigUInt64LE(signed + 12)) : descriptor.readUInt32LE(signed + 8)
      if (crc !== entry.crc32 || compressedSize !== entry.compressedSize || size !== entry.uncompressedSize) {
        throw new UploadRefusal(`"${name}" declares different sizes inside the archive than in its table of contents`)
      }
      next += length
    }
    else {
      const local = localSizes(tail.subarray(nameLength), header.readUInt32LE(22), header.readUInt32LE(18))
      if (header.readUInt32LE(14) !== entry.crc32 || local.compressedSize !== entry.compressedSize || local.size !== entry.uncompressedSize) {
        throw new UploadRefusal(`"${name}" declares different sizes inside the archive than in its table of contents`)
      }
    }
    expected = next
  }
  if (expected !== centralDirectoryOffset) throw new UploadRefusal('it holds data the table of contents does not list (before the table of contents)')
}

async function opened(zip: ZipFile, limits: ZipLimits, readAt: ReadAt, close: () => Promise<void>): Promise<OpenedZip> {
  // Before any entry is read, yauzl's cursor is the central directory's offset (from the end record or its zip64 form).
  const centralDirectoryOffset = (zip as unknown as { readEntryCursor: number }).readEntryCursor
  try {
    const entries = await listEntries(zip, limits)
    await checkLayout(entries, centralDirectoryOffset, readAt)
    return { zip, entries, close }
  }
  catch (error) {
    await close()
    throw error
  }
}

function refusedOpen(error: Error | null) {
  return new UploadRefusal(`it is not a readable ZIP file (${error?.message ?? 'unknown error'})`)
}

/** A ZIP held in memory (a spreadsheet), listed and checked. */
export function openZipBuffer(bytes: Buffer, limits: ZipLimits): Promise<OpenedZip> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(bytes, yauzlOptions(), (error, zip) => {
      if (error || !zip) return reject(refusedOpen(error))
      const readAt: ReadAt = async (offset, length) => bytes.subarray(offset, offset + length)
      opened(zip, limits, readAt, async () => zip.close()).then(resolve, reject)
    })
  })
}

/** A ZIP on disk (a pond archive), listed and checked. */
export async function openZipFile(path: string, limits: ZipLimits): Promise<OpenedZip> {
  const handle = await open(path, 'r')
  const readAt: ReadAt = async (offset, length) => {
    const buffer = Buffer.alloc(length)
    const { bytesRead } = await handle.read(buffer, 0, length, offset)
    return buffer.subarray(0, bytesRead)
  }
  return new Promise((resolve, reject) => {
    yauzl.open(path, yauzlOptions(), (error, zip) => {
      if (error || !zip) {
        void handle.close()
        return reject(refusedOpen(error))
      }
      opened(zip, limits, readAt, async () => {
        zip.close()
        await handle.close()
      }).then(resolve, reject)
    })
  })
}

export function entryStream(zip: ZipFile, entry: Entry): Promise<Readable> {
  return new Promise((resolve, reject) => {
    zip.openReadStream(entry, (error, stream) => {
      if (error || !stream) reject(new UploadRefusal(`"${entry.fileName}" cannot be read (${error?.message ?? 'unknown error'})`))
      else resolve(stream)
    })
  })
}

/** yauzl's size check fails the stream with "too many bytes" / "not enough bytes": say what that means. */
export function streamRefusal(entry: Entry, error: unknown) {
  if (error instanceof UploadRefusal) return error
  const message = (error as Error).message ?? String(error)
  if (/too many bytes|not enough bytes/.test(message)) return new UploadRefusal(`"${entry.fileName}" unpacks to more than it declares, or is damaged`)
  return new UploadRefusal(`"${entry.fileName}" is damaged (${message})`)
}
