import { index, numeric, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core'
import { ponds } from './ponds'
import { users } from './users'
import { visits } from './pond-care'

// Readings are numeric, not float: what the person typed (after unit conversion) comes back unchanged.
const reading = (name: string) => numeric(name, { mode: 'number' })

/** One water test on a pond, in canonical units (°C, mg/L as N, dKH, dGH, ppt). Un-ionized ammonia is computed, not stored. */
export const waterTests = pgTable('water_tests', {
  id: uuid('id').primaryKey().defaultRandom(),
  pondId: uuid('pond_id').notNull().references(() => ponds.id, { onDelete: 'cascade' }),
  testedAt: timestamp('tested_at', { withTimezone: true }).notNull(),
  testedById: uuid('tested_by_id').notNull().references(() => users.id),
  temperatureC: reading('temperature_c'),
  pH: reading('ph'),
  tanMgL: reading('tan_mg_l'),
  nitriteNMgL: reading('nitrite_n_mg_l'),
  nitrateNMgL: reading('nitrate_n_mg_l'),
  khDKH: reading('kh_dkh'),
  ghDGH: reading('gh_dgh'),
  dissolvedOxygenMgL: reading('dissolved_oxygen_mg_l'),
  salinityPpt: reading('salinity_ppt'),
  notes: text('notes').notNull().default(''),
  // The vet visit the test was made during (the tester's open visit of the pond), if any.
  visitId: uuid('visit_id').references(() => visits.id),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
}, t => [
  index('water_tests_pond_tested_idx').on(t.pondId, t.testedAt.desc(), t.id.desc()),
  index('water_tests_tested_by_idx').on(t.testedById),
  index('water_tests_visit_idx').on(t.visitId),
])
