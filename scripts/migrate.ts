// Applies the committed drizzle/ migrations before any server starts: Nitro does not wait for
// async plugins, so migrating at boot could lose the race with the first request.
import { fileURLToPath } from 'node:url'
import { drizzle } from 'drizzle-orm/node-postgres'
import { migrate } from 'drizzle-orm/node-postgres/migrator'
import pg from 'pg'
import { upgradeLegacyEntries } from '../server/db/upgrade-entries'
import { writeWeightLossRule } from '../server/db/weight-loss-rule'

const databaseUrl = process.env.DATABASE_URL
if (!databaseUrl) {
  console.error('migrate: DATABASE_URL is not set (e.g. postgres://fintrail@127.0.0.1:54329/fintrail)')
  process.exit(1)
}

// Resolved from this file, so it works from any working directory.
const migrationsFolder = fileURLToPath(new URL('../drizzle', import.meta.url))
const pool = new pg.Pool({ connectionString: databaseUrl, max: 1, connectionTimeoutMillis: 10_000 })

function withoutPassword(url: string) {
  try {
    const parsed = new URL(url)
    parsed.password = ''
    return parsed.href
  }
  catch {
    return '(an unparsable DATABASE_URL)'
  }
}

try {
  const db = drizzle(pool)
  await migrate(db, { migrationsFolder })
  console.log('migrations applied')
  // Before anything writes a weighing: the summary trigger reads this row.
  if (await db.transaction(tx => writeWeightLossRule(tx))) console.log('weight-loss rule written, summaries recomputed')
  // Data written in an earlier form: once per entry, each as a new revision (see shared/utils/timeline-upgrade.ts).
  const upgraded = await db.transaction(tx => upgradeLegacyEntries(tx))
  if (upgraded) console.log(`${upgraded} timeline entries brought to the current form`)
}
catch (error) {
  console.error(`migrate: could not apply the migrations in ${migrationsFolder} to ${withoutPassword(databaseUrl)}`)
  console.error(`migrate: ${error instanceof Error ? error.message : String(error)}`)
  const cause = (error as { cause?: unknown }).cause
  if (cause instanceof Error) console.error(`migrate: cause: ${cause.message}`)
  process.exitCode = 1
}
finally {
  await pool.end()
}
