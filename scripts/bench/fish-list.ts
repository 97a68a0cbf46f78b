// 500 fish in one pond, each with an edit history and monthly measurements; times the fish list and a profile.
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { fishListSql } from '../../server/db/queries/fish-list'
import { seedFishListPond } from './seeds'
import { hotReadAccess, load, report, signInCookie, startBenchServer, timeSql } from './support'

const FISH = 500
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 4 })

async function main() {
  const { userId, pondId, fishId } = await seedFishListPond(pool)
  const server = await startBenchServer(3500)
  try {
    const cookie = await signInCookie(server.url, 'bench@example.com')
    const { rows: [session] } = await pool.query('select id from sessions where user_id = $1', [userId])
    const runs = [1, 10].map(connections => ({ connections }))
    const list = [] as Awaited<ReturnType<typeof load>>[]
    const profile = [] as Awaited<ReturnType<typeof load>>[]
    for (const { connections } of runs) {
      list.push(await load(`${server.url}/api/ponds/${pondId}/fish`, cookie, 10, connections))
      profile.push(await load(`${server.url}/api/fish/${fishId}`, cookie, 10, connections))
    }
    const db = drizzle(pool)
    const listQuery = db.dialect.sqlToQuery(fishListSql(pondId, {}))
    // The statements each request sends: both routes are hot reads, whose one access statement reads the session
    // row, the membership (and the fish) together; the list then runs its own query.
    const pondAccess = hotReadAccess(db, 'pond', session.id, pondId)
    const fishAccess = hotReadAccess(db, 'fish', session.id, fishId)
    const listSql = await timeSql(pool, 300, async (c) => {
      await c.query(pondAccess)
      await c.query(listQuery.sql, listQuery.params)
    })
    const profileSql = await timeSql(pool, 1000, c => c.query(fishAccess))
    console.log(`Fish list of ${FISH} fish (with latest weight, K and weight-loss flag) and a fish profile, 10 s per run:`)
    runs.forEach(({ connections }, i) => {
      report(`GET /api/ponds/:id/fish, ${connections} connection(s)`, list[i]!, listSql)
      report(`GET /api/fish/:id, ${connections} connection(s)`, profile[i]!, profileSql)
    })
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
