import { createHash, randomUUID } from 'node:crypto'
import type { H3Event } from 'h3'
import type { CurrentUser, PondRole } from '#shared/types'
import { and, eq, inArray, sql } from 'drizzle-orm'
import { cellText, importMappingSchema, indexFish, readMeasurementRow, unitFromHeader, type ImportMapping, type ImportReport, type ReadMeasurement } from '#shared/utils/measurement-import'
import { measurementWarnings, type MeasurementToCheck, type PlausibilityStyle, type PlausibilityWarning } from '#shared/utils/plausibility'
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
  const mapping = { ...result.data, decimalSeparator: result.data.decimalSeparator ?? (importer?.decimalMark === 'comma' ? ',' : '.') }
  // A unit named in the column header ("Weight (g)") stands in for a fixed unit the mapping left out.
  if (mapping.weightColumn && !mapping.weightUnit && !mapping.weightUnitColumn) mapping.weightUnit = unitFromHeader(mapping.weightColumn, 'weight') as ImportMapping['weightUnit']
  if (mapping.lengthColumn && !mapping.lengthUnit && !mapping.lengthUnitColumn) mapping.lengthUnit = unitFromHeader(mapping.lengthColumn, 'length') as ImportMapping['lengthUnit']
  return mapping
}

/** The same row read the same way always gives the same key, whichever file or import it comes from. */
export function importKey(m: ReadMeasurement) {
  return createHash('sha256').update([m.fishId, m.date, m.weightG ?? '', m.lengthCm ?? '', m.lengthType].join('|')).digest('hex')
}

/** The importer's style, and whether they confirmed the flagged rows (form field `acknowledgeWarnings=true`). */
export function importOptions(importer: Pick<CurrentUser, 'units' | 'decimalMark'>, fields: Record<string, string>): ImportOptions {
  return { style: { units: importer.units, decimalMark: importer.decimalMark }, acknowledgeWarnings: fields.acknowledgeWarnings === 'true' }
}

// A date-only measurement means midday UTC, as the timeline form sends it; "today" allows for time zones ahead of UTC.
const dayToInstant = (day: string) => new Date(`${day}T12:00:00.000Z`)
const todayAnywhere = () => new Date(Date.now() + 14 * 3_600_000).toISOString().slice(0, 10)

interface Plan {
  report: Omit<ImportReport, 'importId' | 'dryRun' | 'importedCount'>
  ready: { row: number, key: string, value: ReadMeasurement, warnings?: PlausibilityWarning[] }[]
}

export interface ImportOptions {
  /** The importer's units and decimal mark, for messages. */
  style: PlausibilityStyle
  /** Rows flagged as implausible are imported (their warnings kept) only when the importer confirmed them. */
  acknowledgeWarnings: boolean
}

const DAY_MS = 86_400_000
const PLAUSIBILITY_WINDOW_MS = 42 * DAY_MS

/**
 * The same plausibility rule as a typed measurement, for every ready row: against the fish's stored
 * measurements and the file's own earlier rows. Each fish's list is sorted once and read through a
 * six-week window, so a long file stays linear.
 */
async function flagImplausible(db: Reader, fish: { id: string, species: string, hatchYear: number | null }[], ready: Plan['ready'], style: PlausibilityStyle) {
  const fishIds = [...new Set(ready.map(r => r.value.fishId))]
  const flagged = new Map<Plan['ready'][number], PlausibilityWarning[]>()
  if (!fishIds.length) return flagged
  const stored = await db.select({ fishId: schema.timelineEntries.fishId, occurredAt: schema.timelineEntries.occurredAt, data: schema.timelineEntries.data })
    .from(schema.timelineEntries)
    .where(and(inArray(schema.timelineEntries.fishId, fishIds), eq(schema.timelineEntries.kind, 'measurement'), eq(schema.timelineEntries.enteredInError, false)))
  type Item = MeasurementToCheck & { time: number, row?: Plan['ready'][number] }
  const byFish = new Map<string, Item[]>()
  const push = (fishId: string, item: Item) => (byFish.get(fishId) ?? byFish.set(fishId, []).get(fishId)!).push(item)
  for (const s of stored) push(s.fishId, { ...(s.data as Omit<MeasurementToCheck, 'occurredAt'>), occurredAt: s.occurredAt, time: s.occurredAt.getTime() })
  for (const r of ready) {
    const at = dayToInstant(r.value.date)
    push(r.value.fishId, { weightG: r.value.weightG, lengthCm: r.value.lengthCm, lengthType: r.value.lengthType, occurredAt: at, time: at.getTime(), row: r })
  }
  const fishById = new Map(fish.map(f => [f.id, f]))
  for (const [fishId, items] of byFish) {
    items.sort((a, b) => a.time - b.time)
    let start = 0
    for (let i = 0; i < items.length; i++) {
      const item = items[i]!
      if (!item.row) continue
      while (items[start]!.time < item.time - PLAUSIBILITY_WINDOW_MS) start++
      const warnings = measurementWarnings(fishById.get(fishId)!, item, items.slice(start, i), style)
      if (warnings.length) flagged.set(item.row, warnings)
    }
  }
  return flagged
}

/** Reads every row and decides its fate: ready, refused with a reason, a repeat within the file, or imported before. */
export async function planImport(db: Reader, pondId: string, sheet: Spreadsheet, mapping: ImportMapping, options: ImportOptions = { style: { units: 'metric', decimalMark: 'point' }, acknowledgeWarnings: false }): Promise<Plan> {
  const fish = await db.select({ id: schema.fish.id, name: schema.fish.name, microchip: schema.fish.microchip, species: schema.fish.species, hatchYear: schema.fish.hatchYear })
    .from(schema.fish).where(eq(schema.fish.pondId, pondId))
  const index = indexFish(fish)
  const today = todayAnywhere()
  const mapped = [mapping.fishColumn, mapping.dateColumn, mapping.weightColumn, mapping.weightUnitColumn, mapping.lengthColumn, mapping.lengthUnitColumn].filter((c): c is string => Boolean(c))
  const problems: ImportReport['problems'] = []
  const skipped: ImportReport['skipped'] = []
  const candidates: Plan['ready'] = []
  const firstRowOfKey = new Map<string, number>()
  for (const [at, row] of sheet.rows.entries()) {
    // 100,000 rows take the event loop for a second or more: let other requests in every few thousand.
    if (at % 2_000 === 1_999) await new Promise(resolve => setImmediate(resolve))
    const result = readMeasurementRow(row.cells, mapping, index, today, options.style)
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
  const readable = candidates.filter((c) => {
    const earlier = before.get(c.key)
    if (earlier) skipped.push({ row: c.row, reason: 'already_imported', message: `Imported before, on ${earlier.at.toISOString().slice(0, 10)} from ${earlier.fileName}` })
    return !earlier
  })
  const warned = await flagImplausible(db, fish, readable, options.style)
  const flagged: ImportReport['flagged'] = readable.filter(r => warned.has(r))
    .map(r => ({ row: r.row, fishName: r.value.fishName, date: r.value.date, warnings: warned.get(r)! }))
  const ready = options.acknowledgeWarnings
    ? readable.map(r => (warned.has(r) ? { ...r, warnings: warned.get(r) } : r))
    : readable.filter(r => !warned.has(r))
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
      readyCount: ready.length, problems, skipped, flagged, warningsAcknowledged: options.acknowledgeWarnings,
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
export async function runImport(event: H3Event, pondId: string, authorId: string, sheet: Spreadsheet, mapping: ImportMapping, fileSha256: string, options?: ImportOptions): Promise<ImportReport> {
  return useDb().transaction(async (tx) => {
    // The pond row, as custody work takes it: no second import, move or handover runs in between.
    await lockPonds(tx, [pondId])
    const { report, ready } = await planImport(tx, pondId, sheet, mapping, options)
    // Each fish's measurement summary is refreshed once at the end, not once per row (drizzle/0012).
    await tx.execute(sql`select set_config('fintrail.bulk_measurements', 'on', true)`)
    const [record] = await tx.insert(schema.measurementImports).values({
      pondId, importedById: authorId, fileName: sheet.fileName, fileSha256, mapping,
      rowCount: report.rowCount, importedCount: ready.length, problemCount: report.problems.length, skippedCount: report.skipped.length,
    }).returning({ id: schema.measurementImports.id })
    for (let i = 0; i < ready.length; i += CHUNK) {
      const chunk = ready.slice(i, i + CHUNK).map(r => ({ ...r, id: randomUUID() }))
      const rows = chunk.map(({ id, value: v, warnings }) => ({
        id, fishId: v.fishId, pondId, kind: 'measurement' as const, occurredAt: dayToInstant(v.date), authorId,
        data: {
          ...(v.weightG !== undefined ? { weightG: v.weightG } : {}), ...(v.lengthCm !== undefined ? { lengthCm: v.lengthCm } : {}), lengthType: v.lengthType,
          ...(v.entered ? { entered: v.entered } : {}), ...(warnings?.length ? { warnings } : {}),
        },
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
