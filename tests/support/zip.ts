import { ZipFile } from 'yazl'
import yauzl from 'yauzl'

export type ZipContents = Map<string, Buffer>

/** Every entry of a ZIP held in memory: only for the small archives tests make. */
export function readZip(bytes: Buffer): Promise<ZipContents> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(bytes, { lazyEntries: true }, (error, zip) => {
      if (error || !zip) return reject(error)
      const contents: ZipContents = new Map()
      zip.on('entry', (entry: yauzl.Entry) => {
        zip.openReadStream(entry, (streamError, stream) => {
          if (streamError || !stream) return reject(streamError)
          const chunks: Buffer[] = []
          stream.on('data', (c: Buffer) => chunks.push(c))
          stream.on('end', () => {
            contents.set(entry.fileName, Buffer.concat(chunks))
            zip.readEntry()
          })
        })
      })
      zip.on('end', () => resolve(contents))
      zip.readEntry()
    })
  })
}

export function writeZip(contents: ZipContents, compress = true): Promise<Buffer> {
  const zip = new ZipFile()
  for (const [name, bytes] of contents) zip.addBuffer(bytes, name, { compress })
  zip.end()
  const chunks: Buffer[] = []
  return new Promise((resolve, reject) => {
    zip.outputStream.on('data', (c: Buffer) => chunks.push(c)).on('end', () => resolve(Buffer.concat(chunks))).on('error', reject)
  })
}

/** Rewrites an entry's name in place (local header and central directory), for names yazl refuses to write. */
export function renameEntry(zip: Buffer, from: string, to: string): Buffer {
  if (from.length !== to.length) throw new Error('names must have the same length')
  const out = Buffer.from(zip)
  let at = out.indexOf(from)
  while (at !== -1) {
    out.write(to, at, 'latin1')
    at = out.indexOf(from, at + 1)
  }
  return out
}

/** Sets the uncompressed size an entry declares in the central directory (offset 24 of its header). */
export function declareSize(zip: Buffer, name: string, size: number): Buffer {
  const out = Buffer.from(zip)
  for (let at = out.indexOf('PK\x01\x02'); at !== -1; at = out.indexOf('PK\x01\x02', at + 4)) {
    const nameLength = out.readUInt16LE(at + 28)
    if (out.toString('latin1', at + 46, at + 46 + nameLength) === name) out.writeUInt32LE(size, at + 24)
  }
  return out
}
