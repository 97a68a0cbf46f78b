import type { Readable } from 'node:stream'
import { createInterface } from 'node:readline'
import yauzl, { type Entry, type ZipFile } from 'yauzl'

/** Refusals of an archive: 400 with the reason, nothing written. */
export function archiveRefused(reason: string, statusCode = 400) {
  return createError({ statusCode, statusMessage: 'Archive refused', message: `The archive was refused: ${reason}. Nothing was imported.`, data: { fieldErrors: { archive: [reason] } } })
}

export function openZip(path: string): Promise<ZipFile> {
  return new Promise((resolve, reject) => {
    // validateEntrySizes makes a stream fail when an entry unpacks to more than it declared (a lying zip bomb);
    // strictFileNames refuses backslashes; yauzl itself refuses absolute paths and ".." (zip slip).
    yauzl.open(path, { lazyEntries: true, autoClose: false, validateEntrySizes: true, strictFileNames: true, decodeStrings: true }, (error, zip) => {
      if (error || !zip) reject(archiveRefused(`it is not a readable ZIP file (${error?.message ?? 'unknown error'})`))
      else resolve(zip)
    })
  })
}

/** Every entry of the central directory, in order. */
export function listEntries(zip: ZipFile): Promise<Entry[]> {
  return new Promise((resolve, reject) => {
    const entries: Entry[] = []
    zip.on('entry', (entry: Entry) => {
      entries.push(entry)
      zip.readEntry()
    })
    zip.once('end', () => resolve(entries))
    zip.once('error', (error: Error) => reject(archiveRefused(error.message)))
    zip.readEntry()
  })
}

export function entryStream(zip: ZipFile, entry: Entry): Promise<Readable> {
  return new Promise((resolve, reject) => {
    zip.openReadStream(entry, (error, stream) => {
      if (error || !stream) reject(archiveRefused(`${entry.fileName} cannot be read (${error?.message ?? 'unknown error'})`))
      else resolve(stream)
    })
  })
}

/** The lines of a text entry, refusing any single line longer than `maxLineBytes`. */
export async function* entryLines(zip: ZipFile, entry: Entry, maxLineBytes: number): AsyncGenerator<string> {
  const stream = await entryStream(zip, entry)
  const lines = createInterface({ input: stream, crlfDelay: Infinity })
  try {
    for await (const line of lines) {
      if (line.length > maxLineBytes) throw archiveRefused(`${entry.fileName} has a line longer than ${maxLineBytes} bytes`)
      yield line
    }
  }
  catch (error) {
    if ((error as { statusCode?: number }).statusCode) throw error
    throw archiveRefused(`${entry.fileName} is damaged (${(error as Error).message})`)
  }
}
