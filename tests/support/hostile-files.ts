// Hostile uploads, built in memory by the tests and the load script (no blobs in the repository).
import { createHash } from 'node:crypto'
import { constants, createDeflateRaw } from 'node:zlib'
import ExcelJS from 'exceljs'
import { readZip, writeZip, type ZipContents } from './zip'

/** Raw deflate of `prefix` followed by `fill` bytes up to `bytes` in all, streamed so that gigabytes cost no memory here. */
export async function deflatedFill(bytes: number, fill = 0, prefix = Buffer.alloc(0)): Promise<Buffer> {
  const deflate = createDeflateRaw({ level: constants.Z_BEST_COMPRESSION })
  const chunks: Buffer[] = []
  deflate.on('data', (c: Buffer) => chunks.push(c))
  deflate.write(prefix)
  const block = Buffer.alloc(4 * 1024 * 1024, fill)
  for (let left = bytes - prefix.length; left > 0; left -= block.length) {
    if (!deflate.write(left >= block.length ? block : block.subarray(0, left))) await new Promise(r => deflate.once('drain', r))
  }
  await new Promise(r => deflate.end(r))
  return Buffer.concat(chunks)
}

/** A ZIP of entries packed beforehand (CRCs left at 0, which readers that trust the sizes never check). */
export function packedZip(entries: { name: string, packed: Buffer, size: number }[]): Buffer {
  const parts: Buffer[] = []
  const directory: Buffer[] = []
  let offset = 0
  for (const entry of entries) {
    const name = Buffer.from(entry.name)
    const local = localHeader(name, entry.packed.length, entry.size)
    const central = Buffer.alloc(46)
    central.writeUInt32LE(0x02014B50, 0)
    central.writeUInt16LE(20, 4)
    central.writeUInt16LE(20, 6)
    central.writeUInt16LE(8, 10)
    central.writeUInt32LE(entry.packed.length, 20)
    central.writeUInt32LE(entry.size, 24)
    central.writeUInt16LE(name.length, 28)
    central.writeUInt32LE(offset, 42)
    parts.push(local, name, entry.packed)
    directory.push(central, name)
    offset += local.length + name.length + entry.packed.length
  }
  const directoryBytes = Buffer.concat(directory)
  const end = Buffer.alloc(22)
  end.writeUInt32LE(0x06054B50, 0)
  end.writeUInt16LE(entries.length, 8)
  end.writeUInt16LE(entries.length, 10)
  end.writeUInt32LE(directoryBytes.length, 12)
  end.writeUInt32LE(offset, 16)
  return Buffer.concat([...parts, directoryBytes, end])
}

function localHeader(name: Buffer, packedLength: number, size: number) {
  const header = Buffer.alloc(30)
  header.writeUInt32LE(0x04034B50, 0)
  header.writeUInt16LE(20, 4)
  header.writeUInt16LE(8, 8)
  header.writeUInt32LE(packedLength >>> 0, 18)
  header.writeUInt32LE(size >>> 0, 22)
  header.writeUInt16LE(name.length, 26)
  return header
}

/** Where the central directory starts, from the end-of-directory record. */
function endRecord(zip: Buffer) {
  const at = zip.lastIndexOf(Buffer.from([0x50, 0x4B, 0x05, 0x06]))
  if (at < 0) throw new Error('no end record')
  return { at, directoryOffset: zip.readUInt32LE(at + 16) }
}

/**
 * A real ZIP with one more local entry slipped in before the central directory, which does not list it:
 * a reader that walks local headers unpacks it (to `hiddenBytes` of zeros); the directory never shows it.
 */
export async function withHiddenEntry(zip: Buffer, hiddenName: string, hiddenBytes: number): Promise<Buffer> {
  const packed = await deflatedFill(hiddenBytes)
  const name = Buffer.from(hiddenName)
  const hidden = Buffer.concat([localHeader(name, packed.length, hiddenBytes), name, packed])
  const { at, directoryOffset } = endRecord(zip)
  const out = Buffer.concat([zip.subarray(0, directoryOffset), hidden, zip.subarray(directoryOffset)])
  // The end record moves by the hidden bytes; the directory's offset in it moves with it.
  out.writeUInt32LE(directoryOffset + hidden.length, at + hidden.length + 16)
  return out
}

/** Changes the uncompressed size one entry's local header declares, leaving the central directory as it was. */
export function withLocalSize(zip: Buffer, entryName: string, size: number): Buffer {
  const out = Buffer.from(zip)
  const name = Buffer.from(entryName)
  for (let at = out.indexOf('PK\x03\x04'); at !== -1; at = out.indexOf('PK\x03\x04', at + 4)) {
    const nameLength = out.readUInt16LE(at + 26)
    if (nameLength === name.length && out.subarray(at + 30, at + 30 + nameLength).equals(name)) {
      if (out.readUInt16LE(at + 6) & 0x08) throw new Error('entry has a data descriptor; write it without one')
      out.writeUInt32LE(size, at + 22)
      return out
    }
  }
  throw new Error(`no local entry ${entryName}`)
}

const NS = 'http://schemas.openxmlformats.org/spreadsheetml/2006/main'
const REL = 'http://schemas.openxmlformats.org/officeDocument/2006/relationships'

/**
 * A legal workbook of `rows` rows (100,000 make about 10 MB), written as SpreadsheetML by hand because
 * exceljs needs most of a minute for it: weights of invented fish, with a note per row for bulk.
 */
export async function largeWorkbook(rows: number): Promise<Buffer> {
  const inline = (text: string) => `<c t="inlineStr"><is><t>${text}</t></is></c>`
  const lines = [`<?xml version="1.0" encoding="UTF-8" standalone="yes"?><worksheet xmlns="${NS}"><sheetData>`,
    `<row r="1">${['Fish', 'Date', 'Weight (g)', 'Length (cm)', 'Note'].map(inline).join('')}</row>`]
  for (let i = 0; i < rows; i++) {
    const note = createHash('sha256').update(String(i)).digest('hex') + createHash('sha256').update(`${i} again`).digest('hex')
    lines.push(`<row r="${i + 2}">${inline(`Fish ${i % 500}`)}${inline(`2024-${String(1 + (i % 12)).padStart(2, '0')}-15`)}<c><v>${500 + (i % 3000)}</v></c><c><v>${20 + (i % 50)}</v></c>${inline(note)}</row>`)
  }
  lines.push('</sheetData></worksheet>')
  return writeZip(new Map([
    ['[Content_Types].xml', Buffer.from(`<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"><Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/><Default Extension="xml" ContentType="application/xml"/><Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/></Types>`)],
    ['_rels/.rels', Buffer.from(`<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="${REL}/officeDocument" Target="xl/workbook.xml"/></Relationships>`)],
    ['xl/workbook.xml', Buffer.from(`<?xml version="1.0" encoding="UTF-8" standalone="yes"?><workbook xmlns="${NS}" xmlns:r="${REL}"><sheets><sheet name="Weigh-ins" sheetId="1" r:id="rId1"/></sheets></workbook>`)],
    ['xl/_rels/workbook.xml.rels', Buffer.from(`<?xml version="1.0" encoding="UTF-8" standalone="yes"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="rId1" Type="${REL}/worksheet" Target="worksheets/sheet1.xml"/></Relationships>`)],
    ['xl/worksheets/sheet1.xml', Buffer.from(lines.join(''))],
  ]))
}

export function largeCsv(rows: number): string {
  const lines = ['Fish,Date,Weight']
  for (let i = 0; i < rows; i++) lines.push(`Fish ${i % 500},2024-${String(1 + (i % 12)).padStart(2, '0')}-15,${500 + (i % 3000)}`)
  return `${lines.join('\n')}\n`
}

/** A small workbook as exceljs writes it, unpacked, to build variants from. */
export async function smallWorkbookContents(): Promise<ZipContents> {
  const workbook = new ExcelJS.Workbook()
  const sheet = workbook.addWorksheet('Weigh-ins')
  sheet.addRow(['Fish', 'Date', 'Weight'])
  sheet.addRow(['Hana', '2024-01-01', 1000])
  const contents = await readZip(Buffer.from(await workbook.xlsx.writeBuffer()))
  // exceljs lists folders too; yazl writes files only.
  return new Map([...contents].filter(([name]) => !name.endsWith('/')))
}

/** The same workbook written again by yazl, which puts a buffer's sizes in its local header (no data descriptor). */
export async function smallWorkbook(): Promise<Buffer> {
  return writeZip(await smallWorkbookContents())
}

/** A pond archive whose manifest.json is `bytes` long: valid JSON padded with spaces, packed to almost nothing. */
export async function archiveWithPaddedManifest(manifest: object, bytes: number): Promise<Buffer> {
  return packedZip([{ name: 'manifest.json', packed: await deflatedFill(bytes, 0x20, Buffer.from(JSON.stringify(manifest))), size: bytes }])
}
