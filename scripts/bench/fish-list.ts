// 500 fish in one pond, each with an edit history and monthly measurements; times the fish list and a profile.
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { fishListSql } from '../../server/db/queries/fish-list'
import { BENCH_PASSWORD, load, report, signInCookie, startBenchServer, timeSql } from './support'

const FISH = 500
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 4 })

async function seed() {
  const hash = await new Hash(new Scrypt({})).make(BENCH_PASSWORD)
  const { rows: [user] } = await pool.query(`insert into users (name, email, password_hash) values ('Bench Owner', 'bench@example.com', $1) returning id`, [hash])
  const { rows: [pond] } = await pool.query(`insert into ponds (name, volume_litres) values ('Bench pond', 50000) returning id`)
  await pool.query(`insert into memberships (pond_id, user_id, role) values ($1, $2, 'owner')`, [pond.id, user.id])
  await pool.query(`
    insert into fish (pond_id, name, species, scientific_name, variety, hatch_year, microchip, version)
    select $1, 'Fish ' || lpad(i::text, 3, '0'), 'koi', 'Cyprinus carpio', 'Kohaku', 2000 + i % 25, '999' || lpad(i::text, 12, '0'), 4
    from generate_series(1, ${FISH}) i`, [pond.id])
  await pool.query(`
    insert into fish_edits (fish_id, user_id, changes, created_at)
    select f.id, $1, jsonb_build_array(jsonb_build_object('field', 'variety', 'from', 'Sanke', 'to', 'Kohaku')), now() - (n || ' days')::interval
    from fish f cross join generate_series(1, 3) n where f.pond_id = $2`, [user.id, pond.id])
  // Two years of monthly measurements per fish: 12,000 timeline entries in the pond.
  await pool.query(`
    insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
    select f.id, f.pond_id, 'measurement', now() - (m || ' months')::interval, $1,
      jsonb_build_object('weightG', 800 + 20 * (24 - m) + (random() * 50)::int, 'lengthCm', 38 + (24 - m) * 0.2, 'lengthType', 'total')
    from fish f cross join generate_series(1, 24) m where f.pond_id = $2`, [user.id, pond.id])
  await pool.query('analyze')
  const { rows: [fish] } = await pool.query(`select id from fish where pond_id = $1 order by name limit 1`, [pond.id])
  return { userId: user.id as string, pondId: pond.id as string, fishId: fish.id as string }
}

async function main() {
  const { userId, pondId, fishId } = await seed()
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
