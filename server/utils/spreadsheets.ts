import { createHash, randomUUID } from 'node:crypto'
import { createWriteStream } from 'node:fs'
import { mkdir, rm } from 'node:fs/promises'
import { join } from 'node:path'
import { Transform, type Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import busboy from 'busboy'
import type { H3Event } from 'h3'
import { IMPORT_MAX_BYTES } from '#shared/utils/measurement-import'
import type { Spreadsheet } from '../workers/spreadsheet-read'

export type { SheetRow, Spreadsheet } from '../workers/spreadsheet-read'

function refuse(statusCode: number, message: string, field = 'file') {
  return createError({ statusCode, statusMessage: statusCode === 413 ? 'Too large' : 'Invalid input', message, data: { fieldErrors: { [field]: [message] } } })
}

const tooLarge = () => refuse(413, `The file is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB`)

/** An uploaded spreadsheet on disk: the server never holds the whole body in memory. Remove it when done. */
export interface ReceivedFile { name: string, type: string, path: string, bytes: number, sha256: string }

/**
 * The uploaded file and the other form fields, streamed: the file goes straight to a temporary file (hashed on
 * the way), so ten uploads at once cost the server a few buffers, not ten bodies. Refused before reading when
 * the declared length is larger than a file may be, and as soon as the bytes pass the limit when it lied.
 */
export async function receiveImportForm(event: H3Event) {
  const declared = Number(getRequestHeader(event, 'content-length') ?? Number.NaN)
  if (!Number.isFinite(declared)) throw refuse(411, 'Send the file with its length (an ordinary form upload)')
  if (declared > IMPORT_MAX_BYTES + 64 * 1024) throw tooLarge()
  const dir = join(storageRoot(), 'tmp')
  await mkdir(dir, { recursive: true })
  const path = join(dir, `sheet-${randomUUID()}`)
  const remove = () => rm(path, { force: true })
  try {
    const { file, fields } = await streamForm(event, path)
    if (!file || file.bytes === 0) throw refuse(400, 'Choose a spreadsheet file (.csv or .xlsx)')
    return { file, fields, remove }
  }
  catch (error) {
    await remove()
    throw error
  }
}

function streamForm(event: H3Event, path: string) {
  const request = event.node.req
  return new Promise<{ file: ReceivedFile | undefined, fields: Record<string, string> }>((resolve, reject) => {
    let parser: busboy.Busboy
    try {
      parser = busboy({ headers: request.headers, limits: { files: 1, fileSize: IMPORT_MAX_BYTES, fields: 20, fieldSize: 256 * 1024, parts: 24 } })
    }
    catch {
      return reject(refuse(400, 'Send the spreadsheet as a form upload with a "file" field'))
    }
    const fields: Record<string, string> = {}
    let fileStream: Readable | undefined
    let written: Promise<ReceivedFile> | undefined
    let failure: Error | undefined
    let settled = false
    const settle = () => {
      if (settled) return
      settled = true
      void (written ?? Promise.resolve(undefined)).then(
        file => (failure ? reject(failure) : resolve({ file, fields })),
        error => reject(failure ?? error),
      )
    }
    // Stop reading the form, let the rest of the body drain so the answer can be sent, end the file's write.
    const fail = (error: Error) => {
      if (failure) return
      failure = error
      request.unpipe(parser)
      request.resume()
      fileStream?.destroy()
      settle()
    }
    parser.on('field', (name, value, info) => {
      if (info.valueTruncated) return fail(refuse(413, `The field "${name}" is too long`, name))
      fields[name] = value
    })
    parser.on('file', (name, stream, info) => {
      if (name !== 'file' || written) return stream.resume()
      fileStream = stream
      const hash = createHash('sha256')
      let bytes = 0
      const count = new Transform({
        transform(chunk: Buffer, _encoding, done) {
          bytes += chunk.length
          hash.update(chunk)
          done(null, chunk)
        },
      })
      stream.on('limit', () => fail(tooLarge()))
      written = pipeline(stream, count, createWriteStream(path)).then(() => ({
        name: (info.filename || 'spreadsheet').slice(0, 255), type: info.mimeType ?? '', path, bytes, sha256: hash.digest('hex'),
      }))
      written.catch(() => {})
    })
    parser.on('filesLimit', () => fail(refuse(400, 'Send one file at a time')))
    parser.on('partsLimit', () => fail(refuse(400, 'The form has too many parts')))
    parser.on('fieldsLimit', () => fail(refuse(400, 'The form has too many fields')))
    parser.on('error', () => fail(refuse(400, 'Send the spreadsheet as a form upload with a "file" field')))
    parser.on('close', settle)
    request.on('aborted', () => fail(refuse(400, 'The upload was cut off before it ended')))
    request.pipe(parser)
  })
}

/**
 * A .csv or .xlsx file as named columns and numbered rows (row 1 is the header), parsed in the upload worker;
 * with `sampleRows`, only the first rows come back (and `rowCount` tells how many there are).
 */
export async function readSpreadsheet(event: H3Event, file: ReceivedFile, sheet?: string, sampleRows?: number): Promise<Spreadsheet> {
  if (file.bytes > IMPORT_MAX_BYTES) throw tooLarge()
  return parseSpreadsheet(event, file, sheet, sampleRows)
}
