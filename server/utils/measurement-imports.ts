import { createHash, randomUUID } from 'node:crypto'
import type { H3Event } from 'h3'
import type { CurrentUser, PondRole } from '#shared/types'
import { eq, inArray, sql } from 'drizzle-orm'
import { cellText, importMappingSchema, indexFish, readMeasurementRow, type ImportMapping, type ImportReport, type ReadMeasurement } from '#shared/utils/measurement-import'
import { fieldErrorsFrom } from '#shared/utils/field-errors'
import type { Tx } from './db'
import type { Spreadsheet } from './spreadsheets'

type Reader = Pick<Tx, 'select' | 'execute'>

/**
 * The mapping sent beside the file, as JSON in the "mapping" form field; its columns must exist in the sheet.
 * Without a decimal separator in the mapping, numbers are read with the importer's own decimal mark.
 */
export function parseMapping(text: string | undefined, columns?: string[], importer?: Pick<CurrentUser, 'decimalMark'>): ImportMapping {
  let raw: unknown
  try {
    raw = JSON.parse(text ?? '')
  }
  catch {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'Send the column mapping as JSON in the "mapping" field', data: { fieldErrors: { mapping: ['Missing or not JSON'] } } })
  }
  const result = importMappingSchema.safeParse(raw)
  if (!result.success) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'Some mapping fields need attention', data: { fieldErrors: fieldErrorsFrom(result.error) } })
  if (columns) {
    const fields = ['fishColumn', 'dateColumn', 'weightColumn', 'weightUnitColumn', 'lengthColumn', 'lengthUnitColumn'] as const
    const missing = Object.fromEntries(fields.filter(f => result.data[f] && !columns.includes(result.data[f]!)).map(f => [f, [`The sheet has no column "${result.data[f]}"`]]))
    if (Object.keys(missing).length) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'The mapping names columns the sheet does not have', data: { fieldErrors: missing } })
  }
  return { ...result.data, decimalSeparator: result.data.decimalSeparator ?? (importer?.decimalMark === 'comma' ? ',' : '.') }
}

/** The same row read the same way always gives the same key, whichever file or import it comes from. */
export function importKey(m: ReadMeasurement) {
  return createHash('sha256').update([m.fishId, m.date, m.weightG ?? '', m.lengthCm ?? '', m.lengthType].join('|')).digest('hex')
}

// A date-only measurement means midday UTC, as the timeline form sends it; "today" allows for time zones ahead of UTC.
const dayToInstant = (day: string) => new Date(`${day}T12:00:00.000Z`)
const todayAnywhere = () => new Date(Date.now() + 14 * 3_600_000).toISOString().slice(0, 10)

interface Plan {
  report: Omit<ImportReport, 'importId' | 'dryRun' | 'importedCount'>
  ready: { row: number, key: string, value: ReadMeasurement }[]
}

/** Reads every row and decides its fate: ready, refused with a reason, a repeat within the file, or imported before. */
export async function planImport(db: Reader, pondId: string, sheet: Spreadsheet, mapping: ImportMapping): Promise<Plan> {
  const fish = await db.select({ id: schema.fish.id, name: schema.fish.name, microchip: schema.fish.microchip }).from(schema.fish).where(eq(schema.fish.pondId, pondId))
  const index = indexFish(fish)
  const today = todayAnywhere()
  const mapped = [mapping.fishColumn, mapping.dateColumn, mapping.weightColumn, mapping.weightUnitColumn, mapping.lengthColumn, mapping.lengthUnitColumn].filter((c): c is string => Boolean(c))
  const problems: ImportReport['problems'] = []
  const skipped: ImportReport['skipped'] = []
  const candidates: Plan['ready'] = []
  const firstRowOfKey = new Map<string, number>()
  for (const row of sheet.rows) {
    const result = readMeasurementRow(row.cells, mapping, index, today)
    if (!result.ok) {
      problems.push({ row: row.rowNumber, reason: result.reason, message: result.message, cells: Object.fromEntries(mapped.map(c => [c, cellText(row.cells[c])])) })
      continue
    }
    const key = importKey(result.value)
    const earlier = firstRowOfKey.get(key)
    if (earlier !== undefined) {
      skipped.push({ row: row.rowNumber, reason: 'duplicate_in_file', message: `The same measurement as row ${earlier}` })
      continue
    }
    firstRowOfKey.set(key, row.rowNumber)
    candidates.push({ row: row.rowNumber, key, value: result.value })
  }
  const before = new Map<string, { fileName: string, at: Date }>()
  for (let i = 0; i < candidates.length; i += 5_000) {
    const keys = candidates.slice(i, i + 5_000).map(c => c.key)
    const rows = await db.select({ key: schema.measurementImportRows.importKey, fileName: schema.measurementImports.fileName, at: schema.measurementImports.createdAt })
      .from(schema.measurementImportRows)
      .innerJoin(schema.measurementImports, eq(schema.measurementImports.id, schema.measurementImportRows.importId))
      .where(inArray(schema.measurementImportRows.importKey, keys))
    for (const r of rows) before.set(r.key, { fileName: r.fileName, at: r.at })
  }
  const ready = candidates.filter((c) => {
    const earlier = before.get(c.key)
    if (earlier) skipped.push({ row: c.row, reason: 'already_imported', message: `Imported before, on ${earlier.at.toISOString().slice(0, 10)} from ${earlier.fileName}` })
    return !earlier
  })
  skipped.sort((a, b) => a.row - b.row)
  const byFish = new Map<string, { fishId: string, fishName: string, count: number }>()
  for (const { value } of ready) {
    const entry = byFish.get(value.fishId) ?? { fishId: value.fishId, fishName: value.fishName, count: 0 }
    entry.count++
    byFish.set(value.fishId, entry)
  }
  return {
    ready,
    report: {
      fileName: sheet.fileName, sheet: sheet.sheet, rowCount: sheet.rows.length, blankLines: sheet.blankLines,
      readyCount: ready.length, problems, skipped,
      sample: ready.slice(0, 20).map(({ row, value: v }) => ({ row, fishName: v.fishName, date: v.date, weightG: v.weightG ?? null, lengthCm: v.lengthCm ?? null, lengthType: v.lengthType })),
      byFish: [...byFish.values()].sort((a, b) => a.fishName.localeCompare(b.fishName)),
    },
  }
}

const CHUNK = 1_000

/**
 * Writes the ready rows as measurement entries (each with its first revision) and their keys, in one
 * transaction on the locked pond: two imports of the same file at once cannot both add a row.
 */
export async function runImport(event: H3Event, pondId: string, authorId: string, sheet: Spreadsheet, mapping: ImportMapping, fileSha256: string): Promise<ImportReport> {
  return useDb().transaction(async (tx) => {
    // The pond row, as custody work takes it: no second import, move or handover runs in between.
    await lockPonds(tx, [pondId])
    const { report, ready } = await planImport(tx, pondId, sheet, mapping)
    // Each fish's measurement summary is refreshed once at the end, not once per row (drizzle/0012).
    await tx.execute(sql`select set_config('fintrail.bulk_measurements', 'on', true)`)
    const [record] = await tx.insert(schema.measurementImports).values({
      pondId, importedById: authorId, fileName: sheet.fileName, fileSha256, mapping,
      rowCount: report.rowCount, importedCount: ready.length, problemCount: report.problems.length, skippedCount: report.skipped.length,
    }).returning({ id: schema.measurementImports.id })
    for (let i = 0; i < ready.length; i += CHUNK) {
      const chunk = ready.slice(i, i + CHUNK).map(r => ({ ...r, id: randomUUID() }))
      const rows = chunk.map(({ id, value: v }) => ({
        id, fishId: v.fishId, pondId, kind: 'measurement' as const, occurredAt: dayToInstant(v.date), authorId,
        data: { ...(v.weightG !== undefined ? { weightG: v.weightG } : {}), ...(v.lengthCm !== undefined ? { lengthCm: v.lengthCm } : {}), lengthType: v.lengthType, ...(v.entered ? { entered: v.entered } : {}) },
      }))
      await tx.insert(schema.timelineEntries).values(rows)
      await tx.insert(schema.timelineRevisions).values(rows.map(r => ({ entryId: r.id, revision: 1, occurredAt: r.occurredAt, data: r.data, authorId })))
      await tx.insert(schema.measurementImportRows).values(chunk.map(c => ({ importKey: c.key, importId: record!.id, entryId: c.id, rowNumber: c.row })))
    }
    await tx.execute(sql`select set_config('fintrail.bulk_measurements', 'off', true)`)
    const fishIds = [...new Set(ready.map(r => r.value.fishId))]
    if (fishIds.length) await tx.execute(sql`select fintrail_refresh_measurement_summary(id) from fish where id = any(${sql.param(fishIds)}::uuid[])`)
    await recordAudit(event, {
      pondId, action: 'measurements.imported',
      details: { importId: record!.id, fileName: sheet.fileName, sheet: sheet.sheet, rows: report.rowCount, imported: ready.length, problems: report.problems.length, skipped: report.skipped.length },
    }, tx)
    return { ...report, importId: record!.id, dryRun: false, importedCount: ready.length }
  })
}

// Keepers arrive with years of weights in spreadsheets; a vet's records are clinical and typed at the pond side.
export const IMPORT_ROLES: readonly PondRole[] = ['owner', 'keeper']
