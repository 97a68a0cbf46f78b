// A .csv or .xlsx file as named columns and numbered rows. Runs in the upload worker.
import Papa from 'papaparse'
import { IMPORT_MAX_BYTES, IMPORT_MAX_COLUMNS, IMPORT_MAX_ROWS, type Cell } from '../../shared/utils/measurement-import'
import { readWorkbook } from './xlsx-read'
import type { Entry, ZipFile } from 'yauzl'
import { entryStream, openZipBuffer, streamRefusal, UploadRefusal } from './zip-reader'

export interface SheetRow { rowNumber: number, cells: Record<string, Cell> }

export interface Spreadsheet {
  fileName: string
  format: 'csv' | 'xlsx'
  sheets: string[]
  sheet: string | null
  columns: string[]
  rows: SheetRow[]
  /** Rows with something in them; `rows` may hold only the first few when only a sample was asked for. */
  rowCount: number
  /** Lines with nothing in them: not rows, but counted so that nothing vanishes unmentioned. */
  blankLines: number
}

// An .xlsx is a zip of XML: a 10 MB file may unpack to no more than this.
const XLSX_LIMITS = { maxEntries: 2_000, maxEntryBytes: 100 * 1024 * 1024, maxTotalBytes: 200 * 1024 * 1024 }

function refuse(status: number, message: string, field = 'file') {
  return new UploadRefusal(message, { status, field })
}

/** Unique, non-empty column names from the header row: the mapping refers to columns by these names. */
function columnNames(header: Cell[]): string[] {
  const seen = new Map<string, number>()
  return header.map((cell, i) => {
    const base = (cell == null ? '' : String(cell).trim()) || `Column ${i + 1}`
    const n = (seen.get(base) ?? 0) + 1
    seen.set(base, n)
    return n === 1 ? base : `${base} (${n})`
  })
}

const tooManyRows = () => refuse(413, `The sheet has more than ${IMPORT_MAX_ROWS} rows; at most ${IMPORT_MAX_ROWS} are read at once. Split it into several files.`)

/** Named rows from a table; with `keepRows`, only that many rows become objects and the rest are only counted. */
function toRows(table: Cell[][], firstRowNumber: number, keepRows = Number.POSITIVE_INFINITY) {
  const [header = [], ...body] = table
  const width = Math.max(header.length, ...body.slice(0, 1000).map(r => r.length))
  if (width > IMPORT_MAX_COLUMNS) throw refuse(400, `The sheet has ${width} columns; at most ${IMPORT_MAX_COLUMNS} are read`)
  const columns = columnNames(Array.from({ length: width }, (_, i) => header[i] ?? null))
  if (body.length > IMPORT_MAX_ROWS) throw tooManyRows()
  let blankLines = 0
  let rowCount = 0
  const rows: SheetRow[] = []
  body.forEach((values, i) => {
    if (values.every(v => v == null || String(v).trim() === '')) {
      blankLines++
      return
    }
    rowCount++
    if (rows.length < keepRows) rows.push({ rowNumber: firstRowNumber + 1 + i, cells: Object.fromEntries(columns.map((c, j) => [c, values[j] ?? null])) })
  })
  return { columns, rows, rowCount, blankLines }
}

function readCsv(data: Buffer, keepRows?: number) {
  const text = data.toString('utf8').replace(/^\uFEFF/, '')
  if (text.includes('\uFFFD')) throw refuse(400, 'The file is not UTF-8 text: save it from the spreadsheet as "CSV UTF-8"')
  // Parsing stops a few lines past the row cap (the header, the cap, a last empty line and one more): a file
  // that reaches that point has too many rows whatever follows, and is refused without reading the rest.
  const parsed = Papa.parse<string[]>(text, { skipEmptyLines: false, preview: IMPORT_MAX_ROWS + 3 })
  if (parsed.meta.truncated) throw tooManyRows()
  const fatal = parsed.errors.find(e => e.type === 'Quotes')
  if (fatal) throw refuse(400, `Row ${(fatal.row ?? 0) + 1} has an unclosed quote: ${fatal.message}`)
  // A file ending in a line break gives one empty last line: that is not a row of the sheet.
  const table = parsed.data.at(-1)?.length === 1 && parsed.data.at(-1)![0] === '' ? parsed.data.slice(0, -1) : parsed.data
  return toRows(table, 1, keepRows)
}

async function drain(zip: ZipFile, entry: Entry) {
  if (entry.fileName.endsWith('/')) return
  try {
    for await (const _chunk of await entryStream(zip, entry)) { /* sizes are checked by yauzl as it streams */ }
  }
  catch (error) {
    throw streamRefusal(entry, error)
  }
}

async function readXlsx(data: Buffer, sheetName?: string, keepRows?: number) {
  let opened
  try {
    opened = await openZipBuffer(data, XLSX_LIMITS)
  }
  catch (error) {
    if (error instanceof UploadRefusal) throw refuse(error.status, `This .xlsx file is refused: ${error.message}.`)
    throw error
  }
  try {
    // Every entry unpacks to exactly its declared size, the parts never read included: a file that lies is refused as such.
    for (const entry of opened.entries) await drain(opened.zip, entry)
    const { sheets, sheet, table } = await readWorkbook(opened.zip, opened.entries, sheetName)
    return { ...toRows(table, 1, keepRows), sheets, sheet }
  }
  catch (error) {
    if (error instanceof UploadRefusal && /unpacks to more than it declares|is damaged/.test(error.message)) throw refuse(400, `This .xlsx file is refused: ${error.message}.`)
    throw error
  }
  finally {
    await opened.close()
  }
}

/**
 * A .csv or .xlsx file as named columns and numbered rows (row 1 is the header, as the spreadsheet shows it).
 * With `sampleRows`, only the first rows are kept (rows cross to the server's thread by structured clone), and
 * `rowCount` still counts them all.
 */
export async function readSpreadsheet(file: { name: string, data: Buffer }, sheet?: string, sampleRows?: number): Promise<Spreadsheet> {
  if (file.data.length > IMPORT_MAX_BYTES) throw refuse(413, `The file is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB`)
  const isZip = file.data.subarray(0, 4).equals(Buffer.from([0x50, 0x4B, 0x03, 0x04]))
  if (/\.xlsx$/i.test(file.name) || isZip) {
    if (!isZip) throw refuse(400, 'This .xlsx file is not a workbook (is it an older .xls? Save it as .xlsx or .csv)')
    return { fileName: file.name, format: 'xlsx', ...await readXlsx(file.data, sheet, sampleRows) }
  }
  if (/\.(xls|ods|numbers)$/i.test(file.name)) throw refuse(415, 'Save the sheet as .xlsx or .csv first: older .xls, .ods and .numbers files are not read')
  return { fileName: file.name, format: 'csv', sheets: [], sheet: null, ...readCsv(file.data, sampleRows) }
}
