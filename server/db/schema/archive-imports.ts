import { index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { pondRole, ponds } from './ponds'
import { users } from './users'

// One pond archive read in: which pond it became, who imported it, and when the archive was made.
export const pondImports = pgTable('pond_imports', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id),
  importedById: uuid('imported_by_id').notNull().references(() => users.id),
  exportedAt: timestamp('exported_at', { withTimezone: true }).notNull(),
  sourcePondName: text('source_pond_name').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('pond_imports_pond_idx').on(t.pondId),
  index('pond_imports_imported_by_idx').on(t.importedById),
])

// The people an archive names as authors, kept as the archive wrote them. They are not accounts: nobody
// signs in as one, and a record written by one is never shown as written by a local person.
export const archivePeople = pgTable('archive_people', {
  id: uuid('id').primaryKey().defaultRandom(),
  importId: uuid('import_id').notNull().references(() => pondImports.id),
  name: text('name').notNull(),
  // Their role in the pond when the archive was made; archives made before roles were written have none.
  role: pondRole('role'),
  email: text('email'),
}, t => [
  index('archive_people_import_idx').on(t.importId),
])
