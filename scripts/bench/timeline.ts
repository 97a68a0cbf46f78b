// A fish with 5,000 timeline entries and a pond of 500 weighed fish; times the timeline's first
// page, the profile header, the growth series, a page of the health record and the pond's fish table,
// each against its raw SQL.
// Run: bash scripts/bench/run.sh timeline (or with DATABASE_URL of a migrated scratch database).
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { fishListSql } from '../../server/db/queries/fish-list'
import { growthSql, standingFactsSql, timelinePageSql } from '../../server/db/queries/timeline'
import { recordPageSql } from '../../server/db/queries/record'
import { BUSY_FISH_ENTRIES as ENTRIES, seedBusyFish } from './seeds'
import { hotReadAccess, load, report, signInCookie, startBenchServer, timeSql } from './support'

const POND_FISH = 500
const PORT = Number(process.env.BENCH_PORT ?? 3410)
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10)
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 4 })

async function main() {
  const { userId, fishId, pondId } = await seedBusyFish(pool)
  const server = await startBenchServer(PORT)
  try {
    const cookie = await signInCookie(server.url, 'bench-timeline@example.com')
    const { rows: [session] } = await pool.query('select id from sessions where user_id = $1', [userId])
    const db = drizzle(pool)
    const today = new Date().toISOString().slice(0, 10)
    const asOf = new Date().toISOString()
    const query = (statement: Parameters<typeof db.dialect.sqlToQuery>[0]) => db.dialect.sqlToQuery(statement)
    // The statements each request sends before its own query. The hot reads (timeline, growth, the pond's fish list)
    // send one, reading session, membership and fish together; the others read the session row in the middleware
    // and then the fish with the membership.
    const sessionSql = 'select s.id, s.created_at, s.last_seen_at, s.revoked_at, u.id, u.name, u.email, u.units, u.decimal_mark from sessions s join users u on u.id = s.user_id where s.id = $1 limit 1'
    const fishAccessSql = 'select f.*, m.role from fish f join memberships m on m.pond_id = f.pond_id and m.user_id = $2 where f.id = $1 limit 1'
    const twoStatements = (c: pg.PoolClient) => c.query(sessionSql, [session.id]).then(() => c.query(fishAccessSql, [fishId, userId]))
    const oneStatement = (kind: 'fish' | 'pond', id: string) => (c: pg.PoolClient) => c.query(hotReadAccess(db, kind, session.id, id))
    const routes = [
      { label: `GET /api/fish/:id/timeline (first page of ${ENTRIES} entries)`, path: `/api/fish/${fishId}/timeline`, statement: query(timelinePageSql(fishId, { kinds: [], cursor: null, limit: 50 })!), access: oneStatement('fish', fishId) },
      { label: `GET /api/fish/:id/facts (profile header, ${ENTRIES} entries)`, path: `/api/fish/${fishId}/facts`, statement: query(standingFactsSql(fishId, today, today)), access: twoStatements },
      { label: `GET /api/ponds/:id/fish (${POND_FISH} fish with K and weight-loss flag)`, path: `/api/ponds/${pondId}/fish`, statement: query(fishListSql(pondId, {})), access: oneStatement('pond', pondId) },
      { label: `GET /api/fish/:id/growth (${ENTRIES * 2 / 8} measurements, markers)`, path: `/api/fish/${fishId}/growth`, statement: query(growthSql(fishId)), access: oneStatement('fish', fishId) },
      // The health record reads the whole life in pages of 500, oldest first: the first page is the one that could grow.
      { label: `GET /api/fish/:id/record/entries (first page of 500 of ${ENTRIES})`, path: `/api/fish/${fishId}/record/entries?asOf=${encodeURIComponent(asOf)}&limit=500`, statement: query(recordPageSql(fishId, { asOf, cursor: null, limit: 500 })), access: twoStatements },
    ]
    console.log(`Timeline benchmark on loopback, ${SECONDS} s per run (autocannon), SQL timed alone on one connection:`)
    for (const route of routes) {
      const sql = await timeSql(pool, 500, async (c) => {
        await route.access(c)
        await c.query(route.statement.sql, route.statement.params)
      })
      for (const connections of [1, 10]) {
        report(`${route.label}, ${connections} connection(s)`, await load(`${server.url}${route.path}`, cookie, SECONDS, connections), sql)
      }
    }
  }
  finally {
    server.stop()
    await pool.end()
  }
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
