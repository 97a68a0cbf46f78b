// Reading one sheet of an .xlsx workbook with a streaming XML parser (saxes), entry by entry through the
// checked central directory: no XML part is ever held whole as a string, and the row and column caps stop
// the read as soon as they are passed. Dates are told from numbers by the cell's number format, as
// spreadsheets do (ECMA-376 Part 1, 18.8.30 numFmt: built-in formats 14–22 and 45–47 are dates and times).
import { StringDecoder } from 'node:string_decoder'
import { SaxesParser, type SaxesTagPlain } from 'saxes'
import type { Entry, ZipFile } from 'yauzl'
import { IMPORT_MAX_COLUMNS, IMPORT_MAX_ROWS, type Cell } from '../../shared/utils/measurement-import'
import { entryStream, streamRefusal, UploadRefusal } from './zip-reader'

type Attributes = Record<string, string>
interface Handlers {
  open?: (name: string, attributes: Attributes) => void
  close?: (name: string) => void
  text?: (text: string) => void
}

const localName = (name: string) => name.slice(name.indexOf(':') + 1)

/** Streams one XML part through saxes; element names lose their namespace prefix ("x:row" is "row"). */
async function readXml(zip: ZipFile, entry: Entry, handlers: Handlers) {
  const parser = new SaxesParser()
  parser.on('opentag', (tag: SaxesTagPlain) => handlers.open?.(localName(tag.name), tag.attributes as Attributes))
  if (handlers.close) parser.on('closetag', (tag: SaxesTagPlain) => handlers.close!(localName(tag.name)))
  if (handlers.text) {
    parser.on('text', handlers.text)
    parser.on('cdata', handlers.text)
  }
  const decoder = new StringDecoder('utf8')
  try {
    for await (const chunk of await entryStream(zip, entry)) parser.write(decoder.write(chunk as Buffer))
    parser.write(decoder.end()).close()
  }
  catch (error) {
    if (error instanceof UploadRefusal) throw error
    if (/too many bytes|not enough bytes/.test((error as Error).message)) throw streamRefusal(entry, error)
    throw new UploadRefusal(`The file could not be read as an Excel workbook (.xlsx): ${entry.fileName} is not well-formed XML`)
  }
}

/** A relationship target ("worksheets/sheet1.xml" or "/xl/worksheets/sheet1.xml") as a path in the ZIP. */
function partPath(target: string) {
  return target.startsWith('/') ? target.slice(1) : `xl/${target.replace(/^\.\//, '')}`
}

// Built-in number formats that show a date or time (ECMA-376 Part 1, 18.8.30), and the East Asian ones.
const DATE_FORMAT_IDS = new Set([14, 15, 16, 17, 18, 19, 20, 21, 22, 27, 28, 29, 30, 31, 32, 33, 34, 35, 36, 45, 46, 47, 50, 51, 52, 53, 54, 55, 56, 57, 58])

/** A custom format shows a date when, outside quoted text, escapes and [colour] brackets, it has d, m, y, h or s. */
function isDateFormatCode(code: string) {
  const bare = code.replace(/"[^"]*"/g, '').replace(/\\./g, '').replace(/\[[^\]]*\]/g, '')
  return /[dmyhs]/i.test(bare) && !/^general$/i.test(bare.trim())
}

/** A serial day number as a UTC instant: day 0 is 1899-12-30 in the 1900 system (which counts a 29 Feb 1900 that never was). */
function serialToDate(serial: number, epoch1904: boolean) {
  const base = epoch1904 ? Date.UTC(1904, 0, 1) : Date.UTC(1899, 11, 30)
  return new Date(base + Math.round(serial * 86_400_000))
}

function columnIndex(reference: string | undefined, fallback: number) {
  const letters = reference?.match(/^[A-Z]+/i)?.[0]
  if (!letters) return fallback
  let index = 0
  for (const letter of letters.toUpperCase()) index = index * 26 + letter.charCodeAt(0) - 64
  return index - 1
}

function refuse(status: number, message: string, field = 'file') {
  return new UploadRefusal(message, { status, field })
}

/** The sheet names, and the rows of the chosen sheet (the first when none is named) as the spreadsheet shows them. */
export async function readWorkbook(zip: ZipFile, entries: Entry[], sheetName?: string): Promise<{ sheets: string[], sheet: string, table: Cell[][] }> {
  const byName = new Map(entries.map(e => [e.fileName, e]))
  const part = (path: string) => byName.get(path)
  const workbookEntry = part('xl/workbook.xml')
  const relsEntry = part('xl/_rels/workbook.xml.rels')
  if (!workbookEntry || !relsEntry) throw refuse(400, 'The file could not be read as an Excel workbook (.xlsx)')

  const sheets: { name: string, relationId: string }[] = []
  let epoch1904 = false
  await readXml(zip, workbookEntry, {
    open(name, attributes) {
      if (name === 'sheet') {
        const relationId = Object.entries(attributes).find(([key]) => localName(key) === 'id' && key.includes(':'))?.[1] ?? ''
        sheets.push({ name: attributes.name ?? `Sheet${sheets.length + 1}`, relationId })
      }
      if (name === 'workbookPr') epoch1904 = attributes.date1904 === '1' || attributes.date1904 === 'true'
    },
  })
  const targets = new Map<string, string>()
  let sharedStringsPath = 'xl/sharedStrings.xml'
  let stylesPath = 'xl/styles.xml'
  await readXml(zip, relsEntry, {
    open(name, attributes) {
      if (name !== 'Relationship' || !attributes.Target) return
      targets.set(attributes.Id ?? '', partPath(attributes.Target))
      if (attributes.Type?.endsWith('/sharedStrings')) sharedStringsPath = partPath(attributes.Target)
      if (attributes.Type?.endsWith('/styles')) stylesPath = partPath(attributes.Target)
    },
  })
  const names = sheets.map(s => s.name)
  const chosen = sheetName ? sheets.find(s => s.name === sheetName) : sheets[0]
  if (!chosen) throw refuse(400, sheetName ? `No sheet named "${sheetName}" (the workbook has ${names.join(', ')})` : 'The workbook has no sheets', sheetName ? 'sheet' : 'file')
  const sheetEntry = part(targets.get(chosen.relationId) ?? '')
  if (!sheetEntry) throw refuse(400, `The sheet "${chosen.name}" is missing from the workbook`)

  // Shared strings: every <si> is one string, the text of its <t> elements (rich text runs included, phonetic hints not).
  const strings: string[] = []
  const stringsEntry = part(sharedStringsPath)
  if (stringsEntry) {
    let current = ''
    let inText = false
    let inPhonetic = false
    await readXml(zip, stringsEntry, {
      open(name) {
        if (name === 'si') current = ''
        if (name === 't') inText = true
        if (name === 'rPh') inPhonetic = true
      },
      close(name) {
        if (name === 'si') strings.push(current)
        if (name === 't') inText = false
        if (name === 'rPh') inPhonetic = false
      },
      text(text) {
        if (inText && !inPhonetic) current += text
      },
    })
  }

  // Styles: which cell formats (by index) show dates.
  const dateStyles: boolean[] = []
  const stylesEntry = part(stylesPath)
  if (stylesEntry) {
    const customDates = new Map<number, boolean>()
    let inCellFormats = false
    await readXml(zip, stylesEntry, {
      open(name, attributes) {
        if (name === 'numFmt') customDates.set(Number(attributes.numFmtId), isDateFormatCode(attributes.formatCode ?? ''))
        if (name === 'cellXfs') inCellFormats = true
        if (name === 'xf' && inCellFormats) {
          const id = Number(attributes.numFmtId ?? 0)
          dateStyles.push(customDates.get(id) ?? DATE_FORMAT_IDS.has(id))
        }
      },
      close(name) {
        if (name === 'cellXfs') inCellFormats = false
      },
    })
  }

  const table: Cell[][] = []
  let row: Cell[] = []
  let cell: { column: number, type: string, style: number, text: string, inValue: boolean } | null = null
  await readXml(zip, sheetEntry, {
    open(name, attributes) {
      if (name === 'row') {
        const number = Number(attributes.r) || table.length + 1
        if (number > IMPORT_MAX_ROWS + 1) throw refuse(413, `The sheet has more than ${IMPORT_MAX_ROWS} rows; at most ${IMPORT_MAX_ROWS} are read at once. Split it into several files.`)
        // Rows the file leaves out are blank rows of the sheet: keep the numbering the spreadsheet shows.
        while (table.length < number - 1) table.push([])
        row = []
        table.push(row)
      }
      if (name === 'c') {
        const column = columnIndex(attributes.r, row.length)
        if (column >= IMPORT_MAX_COLUMNS) throw refuse(400, `The sheet has more than ${IMPORT_MAX_COLUMNS} columns; at most ${IMPORT_MAX_COLUMNS} are read`)
        cell = { column, type: attributes.t ?? 'n', style: Number(attributes.s ?? 0), text: '', inValue: false }
      }
      if (cell && (name === 'v' || name === 't')) cell.inValue = true
    },
    text(text) {
      if (cell?.inValue) cell.text += text
    },
    close(name) {
      if (!cell) return
      if (name === 'v' || name === 't') cell.inValue = false
      if (name !== 'c') return
      while (row.length < cell.column) row.push(null)
      row[cell.column] = cellValue(cell, strings, dateStyles, epoch1904)
      cell = null
    },
  })
  return { sheets: names, sheet: chosen.name, table }
}

function cellValue(cell: { type: string, style: number, text: string }, strings: string[], dateStyles: boolean[], epoch1904: boolean): Cell {
  const { type, text } = cell
  if (type === 's') return strings[Number(text)] ?? null
  if (type === 'inlineStr' || type === 'str') return text
  if (type === 'b') return text === '1'
  if (type === 'e') return null
  if (type === 'd') {
    const date = new Date(text)
    return Number.isNaN(date.getTime()) ? text : date
  }
  if (text.trim() === '') return null
  const number = Number(text)
  if (!Number.isFinite(number)) return text
  return dateStyles[cell.style] ? serialToDate(number, epoch1904) : number
}
