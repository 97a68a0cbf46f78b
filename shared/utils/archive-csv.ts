// The archive's CSV files are for people with a spreadsheet; the JSON Lines files stay the faithful copy
// an import reads. Here: how a record becomes cells — dates a spreadsheet reads as dates, an entry's
// details flattened into one column per field of its kind (the columns come from the kind's schema).
import type { z } from 'zod'

type Schema = z.ZodType
type Def = { type: string, innerType?: Schema, element?: Schema, in?: Schema, shape?: Record<string, Schema> }

const defOf = (schema: Schema) => (schema as unknown as { def: Def }).def

/** Optional, default, nullable and pipe wrappers taken off. */
function unwrap(schema: Schema): Schema {
  let current = schema
  for (;;) {
    const def = defOf(current)
    if ((def.type === 'optional' || def.type === 'default' || def.type === 'nullable' || def.type === 'prefault') && def.innerType) current = def.innerType
    else if (def.type === 'pipe' && def.in) current = def.in
    else return current
  }
}

const shapeOf = (schema: Schema) => (schema as unknown as { shape?: Record<string, Schema> }).shape ?? null

/** A list of items with fields of their own (exam findings, lab analytes): written to a CSV file of its own, one row per item. */
export interface ItemList { field: string, columns: string[] }

export interface KindColumns {
  /** Dotted paths into the entry's data, one column each ("weightG", "entered.weight"). */
  columns: string[]
  lists: ItemList[]
}

/** The columns of an entry kind's data, read from its zod schema. */
export function kindColumns(schema: Schema): KindColumns {
  const columns: string[] = []
  const lists: ItemList[] = []
  const walk = (shape: Record<string, Schema>, prefix: string) => {
    for (const [key, field] of Object.entries(shape)) {
      const inner = unwrap(field)
      const def = defOf(inner)
      const nested = shapeOf(inner)
      if (def.type === 'object' && nested) walk(nested, `${prefix}${key}.`)
      else if (def.type === 'array' && def.element && shapeOf(unwrap(def.element))) {
        lists.push({ field: `${prefix}${key}`, columns: Object.keys(shapeOf(unwrap(def.element))!) })
        columns.push(`${prefix}${key}`)
      }
      else columns.push(`${prefix}${key}`)
    }
  }
  const shape = shapeOf(unwrap(schema))
  if (shape) walk(shape, '')
  return { columns, lists }
}

const ISO_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/

/**
 * A date-time as spreadsheets read it: "2025-06-02 18:00:00", in UTC (the column names say so).
 * A plain date ("2025-06-02") is already one; anything else is returned as it is.
 */
export function spreadsheetTime(value: string | Date | null | undefined): string | null {
  if (value == null) return null
  if (value instanceof Date) return value.toISOString().slice(0, 19).replace('T', ' ')
  if (!ISO_TIME.test(value)) return value
  const date = new Date(value)
  return Number.isNaN(date.getTime()) ? value : date.toISOString().slice(0, 19).replace('T', ' ')
}

/** A value as one cell: numbers stay numbers, date-times become spreadsheet date-times, lists become "a; b; c". */
export function csvCell(value: unknown): string | number | boolean | null {
  if (value == null) return null
  if (typeof value === 'number' || typeof value === 'boolean') return value
  if (typeof value === 'string') return spreadsheetTime(value)
  if (Array.isArray(value)) return value.map(item => (item && typeof item === 'object' ? itemText(item as Record<string, unknown>) : String(csvCell(item) ?? ''))).join('; ')
  if (typeof value === 'object') return itemText(value as Record<string, unknown>)
  return String(value)
}

/** One item of a list in words: its non-empty fields as "name: value", comma separated. */
function itemText(item: Record<string, unknown>) {
  return Object.entries(item).filter(([, v]) => v !== '' && v != null).map(([k, v]) => `${k}: ${csvCell(v)}`).join(', ')
}

/** The value at a dotted path of an entry's data. */
export function dataValueAt(data: Record<string, unknown>, path: string): unknown {
  let current: unknown = data
  for (const key of path.split('.')) {
    if (!current || typeof current !== 'object') return undefined
    current = (current as Record<string, unknown>)[key]
  }
  return current
}

/** "lab_result" → "lab-result", for file names. */
export const fileSlug = (name: string) => name.replace(/[^a-z0-9]+/gi, '-').replace(/([a-z])([A-Z])/g, '$1-$2').toLowerCase()
