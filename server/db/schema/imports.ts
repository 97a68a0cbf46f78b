import { index, integer, jsonb, pgTable, timestamp, uuid, varchar } from 'drizzle-orm/pg-core'
import { ponds } from './ponds'
import { timelineEntries } from './timeline'
import { users } from './users'

/** One spreadsheet of measurements brought into a pond: what was read, by whom, with which column mapping. */
export const measurementImports = pgTable('measurement_imports', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id),
  importedById: uuid('imported_by_id').notNull().references(() => users.id),
  fileName: varchar('file_name', { length: 255 }).notNull(),
  fileSha256: varchar('file_sha256', { length: 64 }).notNull(),
  mapping: jsonb('mapping').$type<Record<string, unknown>>().notNull(),
  rowCount: integer('row_count').notNull(),
  importedCount: integer('imported_count').notNull(),
  problemCount: integer('problem_count').notNull(),
  skippedCount: integer('skipped_count').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('measurement_imports_pond_idx').on(t.pondId, t.createdAt),
  index('measurement_imports_imported_by_idx').on(t.importedById),
])

/**
 * A key per imported row (a hash of fish, day, weight, length and length type), kept apart from the
 * entry's data so that a later amendment of the entry cannot make the same row import twice.
 */
export const measurementImportRows = pgTable('measurement_import_rows', {
  importKey: varchar('import_key', { length: 64 }).primaryKey(),
  importId: uuid('import_id').notNull().references(() => measurementImports.id),
  entryId: uuid('entry_id').notNull().references(() => timelineEntries.id),
  rowNumber: integer('row_number').notNull(),
}, t => [
  index('measurement_import_rows_import_idx').on(t.importId),
  index('measurement_import_rows_entry_idx').on(t.entryId),
])
