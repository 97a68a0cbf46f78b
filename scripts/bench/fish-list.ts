// 500 fish in one pond, each with an edit history and monthly measurements; times the fish list and a profile.
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { fishListSql } from '../../server/db/queries/fish-list'
import { seedFishListPond } from './seeds'
import { load, report, signInCookie, startBenchServer, timeSql } from './support'

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
    // The statements each request makes: the session row, the membership, then the route's own query.
    const sessionSql = 'select s.id, s.created_at, s.last_seen_at, s.revoked_at, u.id, u.name, u.email, u.units from sessions s join users u on u.id = s.user_id where s.id = $1 limit 1'
    const listSql = await timeSql(pool, 300, async (c) => {
      await c.query(sessionSql, [session.id])
      await c.query('select role from memberships where pond_id = $1 and user_id = $2 limit 1', [pondId, userId])
      await c.query(listQuery.sql, listQuery.params)
    })
    const profileSql = await timeSql(pool, 1000, async (c) => {
      await c.query(sessionSql, [session.id])
      await c.query('select f.*, m.role from fish f join memberships m on m.pond_id = f.pond_id and m.user_id = $2 where f.id = $1 limit 1', [fishId, userId])
      await c.query('select name from ponds where id = (select pond_id from fish where id = $1)', [fishId])
    })
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
