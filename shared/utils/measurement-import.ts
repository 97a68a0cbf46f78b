// Reading weights and lengths from a keeper's spreadsheet: the column mapping, and one row at a time
// into a measurement or a plain reason why not. Nothing is guessed: a date is read in the format the
// person chose, a number with the decimal separator they chose, a unit only from where they said it is.
import { z } from 'zod'
import { LENGTH_TYPES, MEASUREMENT_LIMITS, measurementData, type LengthType } from './timeline-schemas'
import { convert, formatLength, formatMass } from './units'
import type { PlausibilityStyle, PlausibilityWarning } from './plausibility'
import { readDecimal, type DecimalMark } from './decimal'

export const IMPORT_MAX_BYTES = 10 * 1024 * 1024
export const IMPORT_MAX_ROWS = 100_000
export const IMPORT_MAX_COLUMNS = 100

export const WEIGHT_UNITS = ['g', 'kg', 'lb', 'oz'] as const
export const LENGTH_UNITS = ['cm', 'mm', 'm', 'in'] as const
export const DATE_FORMATS = ['YYYY-MM-DD', 'DD/MM/YYYY', 'MM/DD/YYYY'] as const
export type DateFormat = typeof DATE_FORMATS[number]

const column = (missing: string) => z.string(missing).trim().min(1, missing).max(200, 'At most 200 characters')

export const importMappingSchema = z.strictObject({
  fishColumn: column('Choose the column that names the fish'),
  fishMatch: z.enum(['name', 'microchip'], 'Choose whether it holds names or microchip numbers'),
  dateColumn: column('Choose the date column'),
  dateFormat: z.enum(DATE_FORMATS, 'Choose how the dates are written'),
  weightColumn: column('Choose the weight column').optional(),
  // Where the weight's unit is: fixed for the whole file, in a column of its own, or (neither) written in each cell.
  weightUnit: z.enum(WEIGHT_UNITS, 'Choose g, kg, lb or oz').optional(),
  weightUnitColumn: column('Choose the weight unit column').optional(),
  lengthColumn: column('Choose the length column').optional(),
  lengthUnit: z.enum(LENGTH_UNITS, 'Choose cm, mm, m or in').optional(),
  lengthUnitColumn: column('Choose the length unit column').optional(),
  lengthType: z.enum(LENGTH_TYPES, 'Choose total, fork or standard length').default('total'),
  // Left out, the importer's own decimal mark (their account setting) is used.
  decimalSeparator: z.enum(['.', ','], 'Choose . or ,').optional(),
  sheet: z.string().trim().max(200).optional(),
}).superRefine((m, ctx) => {
  if (!m.weightColumn && !m.lengthColumn) ctx.addIssue({ code: 'custom', path: ['weightColumn'], message: 'Choose a weight column, a length column or both' })
  if (m.weightUnit && m.weightUnitColumn) ctx.addIssue({ code: 'custom', path: ['weightUnitColumn'], message: 'Choose a fixed unit or a unit column, not both' })
  if (m.lengthUnit && m.lengthUnitColumn) ctx.addIssue({ code: 'custom', path: ['lengthUnitColumn'], message: 'Choose a fixed unit or a unit column, not both' })
})

export type ImportMapping = z.output<typeof importMappingSchema>

export const IMPORT_PROBLEMS = ['bad_date', 'unknown_fish', 'ambiguous_fish', 'unknown_unit', 'missing_unit', 'not_a_number', 'out_of_range', 'no_measurement'] as const

/** The unit a column header names: "Weight (g)", "kg", "Length in cm", "TL (in)"; undefined when it names none. */
export function unitFromHeader(header: string, quantity: 'weight' | 'length'): string | undefined {
  const text = header.toLowerCase()
  if (quantity === 'weight') {
    if (/\bkg\b|\bkgs\b|kilo/.test(text)) return 'kg'
    if (/\blbs?\b|pound/.test(text)) return 'lb'
    if (/\boz\b|ounce/.test(text)) return 'oz'
    if (/\(g\)|\[g\]|\bgrams?\b|\bin g$|\bg$/.test(text)) return 'g'
    return undefined
  }
  if (/\bmm\b|millimet/.test(text)) return 'mm'
  if (/\bcm\b|centimet/.test(text)) return 'cm'
  // "in" is also a word ("length in cm"), so only as a unit of its own: "(in)", "[in]", "inches", a trailing "in".
  if (/\(in\.?\)|\[in\]|\binch(es)?\b|\bin\.?$|"/.test(text)) return 'in'
  if (/\(m\)|\[m\]|\bmet(re|er)s?\b/.test(text)) return 'm'
  return undefined
}

/**
 * First units for the mapping: the column header's unit, else the importer's unit system (g and cm, or
 * lb and in). A unit column, when there is one, is suggested instead, so no fixed unit is offered then.
 */
export function suggestUnits(mapping: Partial<ImportMapping>, unitSystem: 'metric' | 'us'): Pick<ImportMapping, 'weightUnit' | 'lengthUnit'> {
  const out: Pick<ImportMapping, 'weightUnit' | 'lengthUnit'> = {}
  if (mapping.weightColumn && !mapping.weightUnitColumn) {
    out.weightUnit = (unitFromHeader(mapping.weightColumn, 'weight') ?? (unitSystem === 'us' ? 'lb' : 'g')) as ImportMapping['weightUnit']
  }
  if (mapping.lengthColumn && !mapping.lengthUnitColumn) {
    out.lengthUnit = (unitFromHeader(mapping.lengthColumn, 'length') ?? (unitSystem === 'us' ? 'in' : 'cm')) as ImportMapping['lengthUnit']
  }
  return out
}
export type ImportProblem = typeof IMPORT_PROBLEMS[number]

export type Cell = string | number | boolean | Date | null | undefined

export interface FishForImport { id: string, name: string, microchip: string | null }

export interface ReadMeasurement {
  fishId: string
  fishName: string
  /** Calendar day, YYYY-MM-DD. */
  date: string
  weightG?: number
  lengthCm?: number
  lengthType: LengthType
  /** What the cells said, kept when a unit was converted (the timeline's `entered`). */
  entered?: { weight?: string, length?: string }
}

export interface RowRefusal { ok: false, reason: ImportProblem, message: string }
export type RowResult = { ok: true, value: ReadMeasurement } | RowRefusal

const fail = (reason: ImportProblem, message: string): RowRefusal => ({ ok: false, reason, message })

export function cellText(cell: Cell): string {
  if (cell == null) return ''
  if (cell instanceof Date) return Number.isNaN(cell.getTime()) ? '' : cell.toISOString().slice(0, 10)
  return String(cell).trim()
}

export function normalizeName(name: string) {
  return name.trim().replace(/\s+/g, ' ').toLocaleLowerCase('en')
}

/** Name → fish (several when names repeat), microchip → fish, for the pond's fish. */
export function indexFish(fish: FishForImport[]) {
  const byName = new Map<string, FishForImport[]>()
  const byChip = new Map<string, FishForImport>()
  for (const f of fish) {
    const key = normalizeName(f.name)
    byName.set(key, [...(byName.get(key) ?? []), f])
    if (f.microchip) byChip.set(f.microchip, f)
  }
  return { byName, byChip }
}

export type FishIndex = ReturnType<typeof indexFish>

function findFish(text: string, match: ImportMapping['fishMatch'], index: FishIndex): FishForImport | RowRefusal {
  if (!text) return fail('unknown_fish', 'No fish named in this row')
  if (match === 'microchip') {
    const digits = text.replace(/[\s-]/g, '')
    if (!/^\d{15}$/.test(digits)) return fail('unknown_fish', `"${text}" is not a 15-digit microchip number`)
    return index.byChip.get(digits) ?? fail('unknown_fish', `No fish in this pond has the microchip ${digits}`)
  }
  const found = index.byName.get(normalizeName(text)) ?? []
  if (found.length === 1) return found[0]!
  if (found.length > 1) return fail('ambiguous_fish', `${found.length} fish in this pond are named "${text}": map the microchip column instead`)
  return fail('unknown_fish', `No fish named "${text}" in this pond`)
}

const DATE_PATTERNS: Record<DateFormat, RegExp> = {
  'YYYY-MM-DD': /^(?<y>\d{4})[-/.](?<m>\d{1,2})[-/.](?<d>\d{1,2})$/,
  'DD/MM/YYYY': /^(?<d>\d{1,2})[-/.](?<m>\d{1,2})[-/.](?<y>\d{4})$/,
  'MM/DD/YYYY': /^(?<m>\d{1,2})[-/.](?<d>\d{1,2})[-/.](?<y>\d{4})$/,
}

/** A calendar day from a cell, or why not. A spreadsheet's own date cell needs no format. */
export function readDate(cell: Cell, format: DateFormat, today: string): { ok: true, date: string } | { ok: false, message: string } {
  let date: string
  if (cell instanceof Date) {
    if (Number.isNaN(cell.getTime())) return { ok: false, message: 'Not a date' }
    date = cell.toISOString().slice(0, 10)
  }
  else {
    const text = cellText(cell)
    if (!text) return { ok: false, message: 'No date in this row' }
    const parts = DATE_PATTERNS[format].exec(text)?.groups
    if (!parts) return { ok: false, message: `"${text}" is not a date written as ${format}` }
    const [y, m, d] = [Number(parts.y), Number(parts.m), Number(parts.d)]
    const day = new Date(Date.UTC(y, m - 1, d))
    if (day.getUTCFullYear() !== y || day.getUTCMonth() !== m - 1 || day.getUTCDate() !== d) return { ok: false, message: `"${text}" is not a real day (read as ${format})` }
    date = day.toISOString().slice(0, 10)
  }
  if (date < '1900-01-01') return { ok: false, message: `${date} is too early` }
  if (date > today) return { ok: false, message: `${date} is in the future` }
  return { ok: true, date }
}

const UNIT_WORDS: Record<string, string> = {
  'g': 'g', 'gram': 'g', 'grams': 'g', 'gr': 'g', 'kg': 'kg', 'kgs': 'kg', 'kilo': 'kg', 'kilos': 'kg', 'kilogram': 'kg', 'kilograms': 'kg',
  'lb': 'lb', 'lbs': 'lb', 'pound': 'lb', 'pounds': 'lb', 'oz': 'oz', 'ounce': 'oz', 'ounces': 'oz',
  'cm': 'cm', 'mm': 'mm', 'm': 'm', 'in': 'in', 'inch': 'in', 'inches': 'in', '"': 'in',
}

function unitOf(word: string, allowed: readonly string[]): string | null {
  const unit = UNIT_WORDS[word.trim().toLowerCase().replace(/\.$/, '')]
  return unit && allowed.includes(unit) ? unit : null
}

export const markOfSeparator = (decimal: '.' | ','): DecimalMark => (decimal === ',' ? 'comma' : 'point')

/** Cell text through the one shared parser; the refusal says how to write the number. */
function readNumber(text: string, decimal: '.' | ','): { ok: true, value: number } | { ok: false, message: string } {
  return readDecimal(text, markOfSeparator(decimal))
}

/**
 * An amount in the base unit (g or cm) from a cell: "1250", "1,25" with a decimal comma, "2.5 kg",
 * "3 lb 4 oz". The unit comes from the cell, else the unit column, else the fixed unit; a cell's unit
 * that contradicts the unit column is refused rather than one of them believed.
 */
export function readAmount(cell: Cell, options: { base: 'g' | 'cm', allowed: readonly string[], fixedUnit?: string, unitCell?: Cell, decimal: '.' | ',' }): { ok: true, value: number | undefined, entered?: string } | RowRefusal {
  // A number cell of a workbook is already a number: nothing to read, nothing to misread.
  const numeric = typeof cell === 'number' && Number.isFinite(cell) ? cell : undefined
  const text = numeric !== undefined ? String(numeric) : cellText(cell)
  if (!text) return { ok: true, value: undefined }
  const what = options.base === 'g' ? 'weight' : 'length'
  const unitColumnText = cellText(options.unitCell)
  let columnUnit: string | null = null
  if (unitColumnText) {
    columnUnit = unitOf(unitColumnText, options.allowed)
    if (!columnUnit) return fail('unknown_unit', `"${unitColumnText}" is not a ${what} unit (${options.allowed.join(', ')})`)
  }
  const compound = options.base === 'g' ? /^(?<lb>[\d.,]+)\s*(lb|lbs|pounds?)\.?\s+(?<oz>[\d.,]+)\s*(oz|ounces?)\.?$/i.exec(text)?.groups : undefined
  if (compound) {
    const [lb, oz] = [readNumber(compound.lb!, options.decimal), readNumber(compound.oz!, options.decimal)]
    if (!lb.ok || !oz.ok) return fail('not_a_number', `"${text}" is not a ${what} we can read. ${(!lb.ok ? lb : oz as { message: string }).message}`)
    if (columnUnit) return fail('unknown_unit', `"${text}" gives its own units but the unit column says ${columnUnit}`)
    return { ok: true, value: convert(lb.value, 'lb', 'g') + convert(oz.value, 'oz', 'g'), entered: text.slice(0, 40) }
  }
  const parts = numeric !== undefined ? { number: text, unit: undefined } : /^(?<number>[+-]?[\d.,\s\u00a0\u202f]*\d)\s*(?<unit>[a-zA-Z"]+\.?)?$/.exec(text)?.groups
  if (!parts) return fail('not_a_number', `"${text}" is not a number`)
  const reading = numeric !== undefined ? { ok: true as const, value: numeric } : readNumber(parts.number!, options.decimal)
  if (!reading.ok) return fail('not_a_number', `"${parts.number}" is not a number we can read with "${options.decimal}" as the decimal mark. ${reading.message}`)
  const value = reading.value
  let unit: string | null | undefined = columnUnit ?? options.fixedUnit
  if (parts.unit) {
    const cellUnit = unitOf(parts.unit, options.allowed)
    if (!cellUnit) return fail('unknown_unit', `"${parts.unit}" is not a ${what} unit (${options.allowed.join(', ')})`)
    if (columnUnit && cellUnit !== columnUnit) return fail('unknown_unit', `The cell says ${cellUnit} but the unit column says ${columnUnit}`)
    unit = cellUnit
  }
  if (!unit) return fail('missing_unit', `No unit for the ${what} "${text}": write it in the cell, map a unit column or choose a fixed unit`)
  if (unit === options.base) return { ok: true, value }
  // What the sheet said, kept beside the metric value as the timeline keeps typed text.
  return { ok: true, value: convert(value, unit, options.base), entered: `${parts.number} ${unit}`.slice(0, 40) }
}

const round = (value: number, places: number) => Math.round(value * 10 ** places) / 10 ** places

/** A value over the timeline's limits, said in the importer's own units; null when within them. */
function overLimit(value: { weightG?: number, lengthCm?: number }, style: PlausibilityStyle): string | null {
  const mass = (g: number) => formatMass(g, style.units, style.decimalMark)
  const length = (cm: number) => formatLength(cm, style.units, style.decimalMark)
  if (value.weightG !== undefined && !(value.weightG > 0)) return 'The weight must be more than 0'
  if (value.weightG !== undefined && value.weightG > MEASUREMENT_LIMITS.weightG) {
    return `${mass(value.weightG)} is more than ${mass(MEASUREMENT_LIMITS.weightG)}: not a plausible weight for a pond fish. Check the unit.`
  }
  if (value.lengthCm !== undefined && !(value.lengthCm > 0)) return 'The length must be more than 0'
  if (value.lengthCm !== undefined && value.lengthCm > MEASUREMENT_LIMITS.lengthCm) {
    return `${length(value.lengthCm)} is more than ${length(MEASUREMENT_LIMITS.lengthCm)}: not a plausible length for a pond fish. Check the unit.`
  }
  return null
}

/**
 * One spreadsheet row, by column name, to a measurement or the first reason it cannot be one. Messages
 * about limits speak the importer's units (`style`).
 */
export function readMeasurementRow(cells: Record<string, Cell>, mapping: ImportMapping, index: FishIndex, today: string, style: PlausibilityStyle = { units: 'metric', decimalMark: 'point' }): RowResult {
  const fish = findFish(cellText(cells[mapping.fishColumn]), mapping.fishMatch, index)
  if ('ok' in fish) return fish
  const date = readDate(cells[mapping.dateColumn], mapping.dateFormat, today)
  if (!date.ok) return fail('bad_date', date.message)
  const weight = mapping.weightColumn
    ? readAmount(cells[mapping.weightColumn], { base: 'g', allowed: WEIGHT_UNITS, fixedUnit: mapping.weightUnit, unitCell: mapping.weightUnitColumn ? cells[mapping.weightUnitColumn] : undefined, decimal: mapping.decimalSeparator ?? '.' })
    : { ok: true as const, value: undefined, entered: undefined }
  if (!weight.ok) return weight
  const length = mapping.lengthColumn
    ? readAmount(cells[mapping.lengthColumn], { base: 'cm', allowed: LENGTH_UNITS, fixedUnit: mapping.lengthUnit, unitCell: mapping.lengthUnitColumn ? cells[mapping.lengthUnitColumn] : undefined, decimal: mapping.decimalSeparator ?? '.' })
    : { ok: true as const, value: undefined, entered: undefined }
  if (!length.ok) return length
  if (weight.value === undefined && length.value === undefined) return fail('no_measurement', 'Neither a weight nor a length in this row')
  const value: ReadMeasurement = {
    fishId: fish.id, fishName: fish.name, date: date.date, lengthType: mapping.lengthType,
    ...(weight.value !== undefined ? { weightG: round(weight.value, 1) } : {}),
    ...(length.value !== undefined ? { lengthCm: round(length.value, 2) } : {}),
  }
  // The timeline's own limits decide what is possible, so an import can hold nothing the form would refuse.
  const limit = overLimit(value, style)
  if (limit) return fail('out_of_range', limit)
  const checked = measurementData.safeParse({ weightG: value.weightG, lengthCm: value.lengthCm, lengthType: value.lengthType })
  if (!checked.success) return fail('out_of_range', checked.error.issues[0]!.message)
  const entered = {
    ...(weight.entered ? { weight: weight.entered } : {}),
    ...(length.entered ? { length: length.entered } : {}),
  }
  return { ok: true, value: Object.keys(entered).length ? { ...value, entered } : value }
}

/** A first mapping from the header names, for the person to check: never applied without them. */
export function suggestMapping(columns: string[], samples: Record<string, Cell>[]): Partial<ImportMapping> {
  const find = (pattern: RegExp, except: (string | undefined)[] = []) => columns.find(c => pattern.test(c) && !except.includes(c))
  const chip = find(/chip|pit|transponder/i)
  const name = find(/name|fish|koi/i, [chip])
  const weightUnitColumn = find(/(weight|mass).*unit|unit.*(weight|mass)/i)
  const lengthUnitColumn = find(/length.*unit|unit.*length/i)
  const weightColumn = find(/weight|mass|\bwt\b|\bgrams?\b|\bkg\b|\blbs?\b/i, [weightUnitColumn])
  const lengthColumn = find(/length|\btl\b|\bcm\b/i, [lengthUnitColumn])
  const dateColumn = find(/date|day|when|measured|weighed/i, [weightColumn, lengthColumn])
  const suggestion: Partial<ImportMapping> = {
    fishColumn: name ?? chip, fishMatch: name ? 'name' : chip ? 'microchip' : undefined,
    dateColumn, weightColumn, weightUnitColumn, lengthColumn, lengthUnitColumn,
  }
  // A format is suggested only when the dates themselves rule the others out.
  const dates = dateColumn ? samples.map(s => cellText(s[dateColumn])).filter(Boolean) : []
  const fits = DATE_FORMATS.filter(format => dates.length > 0 && dates.every(d => readDate(d, format, '9999-12-31').ok))
  if (fits.length === 1) suggestion.dateFormat = fits[0]
  return Object.fromEntries(Object.entries(suggestion).filter(([, v]) => v !== undefined)) as Partial<ImportMapping>
}

export interface ImportRowProblem {
  row: number
  reason: ImportProblem
  message: string
  /** The mapped cells as the sheet had them, so the person can find and fix the row. */
  cells: Record<string, string>
}

export interface ImportRowSkipped {
  row: number
  reason: 'duplicate_in_file' | 'already_imported'
  message: string
}

export interface ImportReport {
  importId: string | null
  dryRun: boolean
  fileName: string
  sheet: string | null
  /** Rows with anything in them, the header not counted. */
  rowCount: number
  blankLines: number
  /** Rows that import (a preview) or were imported. */
  readyCount: number
  importedCount: number
  problems: ImportRowProblem[]
  skipped: ImportRowSkipped[]
  /**
   * Rows that read but look implausible by the same rule as the form (shared/utils/plausibility.ts). They are
   * imported, with their warnings kept, only when the import is sent with `acknowledgeWarnings`; otherwise
   * they are held back (not counted as ready or imported).
   */
  flagged: { row: number, fishName: string, date: string, warnings: PlausibilityWarning[] }[]
  /** Whether the flagged rows were confirmed (and so are among the ready or imported rows). */
  warningsAcknowledged: boolean
  /** The first rows as they will land, for the preview. */
  sample: { row: number, fishName: string, date: string, weightG: number | null, lengthCm: number | null, lengthType: LengthType }[]
  byFish: { fishId: string, fishName: string, count: number }[]
}

export interface SpreadsheetColumns {
  fileName: string
  format: 'csv' | 'xlsx'
  sheets: string[]
  sheet: string | null
  columns: string[]
  rowCount: number
  blankLines: number
  /** The first rows, as text, to help choose the mapping. */
  sample: { row: number, cells: Record<string, string> }[]
  suggested: Partial<ImportMapping>
}

export interface MeasurementImportSummary {
  id: string
  fileName: string
  importedBy: string
  rowCount: number
  importedCount: number
  problemCount: number
  skippedCount: number
  createdAt: string
}
