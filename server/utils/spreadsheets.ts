import type { H3Event } from 'h3'
import { IMPORT_MAX_BYTES } from '#shared/utils/measurement-import'
import type { Spreadsheet } from '../workers/spreadsheet-read'

export type { SheetRow, Spreadsheet } from '../workers/spreadsheet-read'

function refuse(statusCode: number, message: string, field = 'file') {
  return createError({ statusCode, statusMessage: statusCode === 413 ? 'Too large' : 'Invalid input', message, data: { fieldErrors: { [field]: [message] } } })
}

/** The uploaded file and the other form fields, read once; refused early when the body is larger than a file may be. */
export async function readImportForm(event: H3Event) {
  const declared = Number(getRequestHeader(event, 'content-length') ?? Number.NaN)
  if (!Number.isFinite(declared)) throw refuse(411, 'Send the file with its length (an ordinary form upload)')
  if (declared > IMPORT_MAX_BYTES + 64 * 1024) throw refuse(413, `The file is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB`)
  const parts = await readMultipartFormData(event).catch(() => undefined)
  if (!parts) throw refuse(400, 'Send the spreadsheet as a form upload with a "file" field')
  const file = parts.find(p => p.name === 'file' && p.filename !== undefined)
  if (!file || file.data.length === 0) throw refuse(400, 'Choose a spreadsheet file (.csv or .xlsx)')
  const fields = Object.fromEntries(parts.filter(p => p.filename === undefined && p.name).map(p => [p.name!, p.data.toString('utf8')]))
  return { file: { name: (file.filename || 'spreadsheet').slice(0, 255), type: file.type ?? '', data: file.data }, fields }
}

/**
 * A .csv or .xlsx file as named columns and numbered rows (row 1 is the header), parsed in the upload worker;
 * with `sampleRows`, only the first rows come back (and `rowCount` tells how many there are).
 */
export async function readSpreadsheet(file: { name: string, data: Buffer }, sheet?: string, sampleRows?: number): Promise<Spreadsheet> {
  if (file.data.length > IMPORT_MAX_BYTES) throw refuse(413, `The file is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB`)
  return parseSpreadsheet(file, sheet, sampleRows)
}
