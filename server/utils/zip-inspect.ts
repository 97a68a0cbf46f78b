import { inflateRawSync } from 'node:zlib'

/** Why a zip file is refused; the message is for the person who sent it. */
export class ZipRefusal extends Error {}

export interface ZipEntry { name: string, compressedSize: number, size: number, method: number, dataOffset: number }

export interface ZipLimits { maxEntries: number, maxEntryBytes: number, maxTotalBytes: number }

const EOCD = 0x06054b50
const CENTRAL = 0x02014b50
const LOCAL = 0x04034b50

/** The entries named by the central directory, with the offsets of their data, before anything is unpacked. */
export function listZipEntries(zip: Buffer, limits: ZipLimits): ZipEntry[] {
  let eocd = -1
  for (let i = zip.length - 22; i >= Math.max(0, zip.length - 22 - 65_535); i--) {
    if (zip.readUInt32LE(i) === EOCD) {
      eocd = i
      break
    }
  }
  if (eocd < 0) throw new ZipRefusal('The file is not a readable zip archive.')
  const count = zip.readUInt16LE(eocd + 10)
  const directoryOffset = zip.readUInt32LE(eocd + 16)
  if (count === 0xFFFF || directoryOffset === 0xFFFFFFFF) throw new ZipRefusal('The archive is too large (zip64).')
  if (count > limits.maxEntries) throw new ZipRefusal(`The archive holds ${count} files; at most ${limits.maxEntries} are accepted.`)
  const entries: ZipEntry[] = []
  let total = 0
  let at = directoryOffset
  for (let n = 0; n < count; n++) {
    if (at + 46 > zip.length || zip.readUInt32LE(at) !== CENTRAL) throw new ZipRefusal('The archive’s table of contents is damaged.')
    const flags = zip.readUInt16LE(at + 8)
    const method = zip.readUInt16LE(at + 10)
    const compressedSize = zip.readUInt32LE(at + 20)
    const size = zip.readUInt32LE(at + 24)
    const nameLength = zip.readUInt16LE(at + 28)
    const skip = nameLength + zip.readUInt16LE(at + 30) + zip.readUInt16LE(at + 32)
    const localOffset = zip.readUInt32LE(at + 42)
    const name = zip.subarray(at + 46, at + 46 + nameLength).toString('utf8')
    at += 46 + skip
    if (flags & 1) throw new ZipRefusal(`"${name}" is encrypted.`)
    if (method !== 0 && method !== 8) throw new ZipRefusal(`"${name}" uses a compression method that is not accepted.`)
    if (name.startsWith('/') || name.includes('\\') || name.split('/').includes('..') || /^[a-z]:/i.test(name)) throw new ZipRefusal(`"${name}" points outside the archive.`)
    if (size > limits.maxEntryBytes) throw new ZipRefusal(`"${name}" unpacks to ${size} bytes; at most ${limits.maxEntryBytes} are accepted.`)
    total += size
    if (total > limits.maxTotalBytes) throw new ZipRefusal(`The archive unpacks to more than ${limits.maxTotalBytes} bytes.`)
    if (localOffset + 30 > zip.length || zip.readUInt32LE(localOffset) !== LOCAL) throw new ZipRefusal(`"${name}" is damaged.`)
    const dataOffset = localOffset + 30 + zip.readUInt16LE(localOffset + 26) + zip.readUInt16LE(localOffset + 28)
    if (dataOffset + compressedSize > zip.length) throw new ZipRefusal(`"${name}" is cut short.`)
    entries.push({ name, compressedSize, size, method, dataOffset })
  }
  return entries
}

/**
 * Unpacks every entry with its declared size as a hard ceiling, so an archive whose headers understate
 * what it unpacks to (a zip bomb) is refused having used no more memory than it declared.
 */
export function checkZip(zip: Buffer, limits: ZipLimits): ZipEntry[] {
  const entries = listZipEntries(zip, limits)
  for (const entry of entries) {
    const data = zip.subarray(entry.dataOffset, entry.dataOffset + entry.compressedSize)
    let unpacked: Buffer
    try {
      unpacked = entry.method === 0 ? data : inflateRawSync(data, { maxOutputLength: Math.max(1, entry.size) })
    }
    catch {
      throw new ZipRefusal(`"${entry.name}" unpacks to more than it declares, or is damaged.`)
    }
    if (unpacked.length !== entry.size) throw new ZipRefusal(`"${entry.name}" does not unpack to the size it declares.`)
  }
  return entries
}
