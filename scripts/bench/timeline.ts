// A fish with 5,000 timeline entries and a pond of 500 weighed fish; times the timeline's first
// page, the profile header, the growth series, a page of the health record and the pond's fish table,
// each against its raw SQL.
// Run: bash scripts/bench/run.sh timeline (or with DATABASE_URL of a migrated scratch database).
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { fishListSql } from '../../server/db/queries/fish-list'
import { growthSql, standingFactsSql, timelinePageSql } from '../../server/db/queries/timeline'
import { recordPageSql } from '../../server/db/queries/record'
import { BENCH_PASSWORD, load, report, signInCookie, startBenchServer, timeSql } from './support'

const ENTRIES = 5000
const POND_FISH = 500
const WEIGHINGS_PER_FISH = 10
const PORT = Number(process.env.BENCH_PORT ?? 3410)
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10)
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 4 })

async function seed() {
  const hash = await new Hash(new Scrypt({})).make(BENCH_PASSWORD)
  const { rows: [user] } = await pool.query(`insert into users (name, email, password_hash) values ('Bench Vet', 'bench-timeline@example.com', $1) returning id`, [hash])
  const { rows: [pond] } = await pool.query(`insert into ponds (name, volume_litres) values ('Busy fish pond', 20000) returning id`)
  const { rows: [big] } = await pool.query(`insert into ponds (name, volume_litres) values ('Five hundred pond', 90000) returning id`)
  await pool.query(`insert into memberships (pond_id, user_id, role) values ($1, $3, 'vet'), ($2, $3, 'vet')`, [pond.id, big.id, user.id])
  const { rows: [fish] } = await pool.query(`insert into fish (pond_id, name, species, scientific_name, hatch_year) values ($1, 'Busy', 'koi', 'Cyprinus carpio', 2004) returning id`, [pond.id])
  const { rows: [friend] } = await pool.query(`insert into fish (pond_id, name, species, scientific_name, hatch_year) values ($1, 'Friend', 'koi', 'Cyprinus carpio', 2006) returning id`, [pond.id])

  // Twenty years of a busy fish, mixed kinds, every entry with its first revision.
  await pool.query(`
    with made as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, related_fish_id, data)
      select $1, $2, (case when i % 8 = 6 and i > 100 then 'observation'
          else (array['measurement','observation','measurement','treatment','exam','problem','companion','procedure'])[1 + i % 8] end)::timeline_kind,
        timestamptz '2006-01-01 12:00Z' + (i * interval '35 hours'), $3, case when i % 8 = 6 and i <= 100 then $4::uuid end,
        case i % 8
          when 0 then jsonb_build_object('weightG', 500 + i, 'lengthCm', 30 + i / 250.0, 'lengthType', 'total')
          when 2 then jsonb_build_object('weightG', 500 + i, 'lengthType', 'total')
          when 1 then jsonb_build_object('signs', jsonb_build_array('eating_well'), 'text', 'Entry ' || i)
          when 3 then jsonb_build_object('drug', 'Salt', 'route', 'bath', 'dose', 3, 'doseUnit', 'g/L', 'startOn', to_char(timestamptz '2006-01-01' + (i * interval '35 hours'), 'YYYY-MM-DD'), 'durationDays', 14)
          when 4 then jsonb_build_object('findings', '[]'::jsonb, 'assessment', 'Routine ' || i)
          when 5 then case when i % 400 = 5 then jsonb_build_object('name', 'Problem ' || i, 'onset', '2006-01-01', 'status', 'active')
            else jsonb_build_object('name', 'Problem ' || i, 'onset', '2006-01-01', 'status', 'resolved', 'resolvedOn', '2007-01-01') end
          when 6 then case when i <= 100 then jsonb_build_object('relatedFishId', $4::text, 'relation', 'always_together')
            else jsonb_build_object('signs', jsonb_build_array('eating_well'), 'text', 'Entry ' || i) end
          else jsonb_build_object('code', case when i = 7 then 'enucleation' else 'fin_trim' end, 'side', case when i = 7 then 'left' else 'not_applicable' end, 'performedBy', 'Bench Vet')
        end
      from generate_series(1, ${ENTRIES}) i
      returning id, occurred_at, data, author_id
    )
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
    select id, 1, occurred_at, data, author_id from made`, [fish.id, pond.id, user.id, friend.id])

  // The fish table: 500 fish weighed and measured twice a year for five years.
  await pool.query(`
    insert into fish (pond_id, name, species, scientific_name, variety, hatch_year)
    select $1, 'Fish ' || lpad(i::text, 3, '0'), 'koi', 'Cyprinus carpio', 'Kohaku', 2000 + i % 25 from generate_series(1, ${POND_FISH}) i`, [big.id])
  await pool.query(`
    with made as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
      select f.id, f.pond_id, 'measurement', timestamptz '2021-04-20 10:00Z' + (n * interval '182 days'), $1,
        jsonb_build_object('weightG', 900 + 80 * n + (random() * 60)::int, 'lengthCm', 38 + n * 0.8, 'lengthType', 'total')
      from fish f cross join generate_series(0, ${WEIGHINGS_PER_FISH - 1}) n where f.pond_id = $2
      returning id, occurred_at, data, author_id
    )
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
    select id, 1, occurred_at, data, author_id from made`, [user.id, big.id])
  await pool.query('analyze')
  return { userId: user.id as string, fishId: fish.id as string, pondId: big.id as string }
}

async function main() {
  const { userId, fishId, pondId } = await seed()
  const server = await startBenchServer(PORT)
  try {
    const cookie = await signInCookie(server.url, 'bench-timeline@example.com')
    const { rows: [session] } = await pool.query('select id from sessions where user_id = $1', [userId])
    const db = drizzle(pool)
    const today = new Date().toISOString().slice(0, 10)
    const asOf = new Date().toISOString()
    const query = (statement: Parameters<typeof db.dialect.sqlToQuery>[0]) => db.dialect.sqlToQuery(statement)
    // The statements each request makes: the session row, the access check, then the route's own query.
    const sessionSql = 'select s.id, s.created_at, s.last_seen_at, s.revoked_at, u.id, u.name, u.email, u.units from sessions s join users u on u.id = s.user_id where s.id = $1 limit 1'
    const fishAccessSql = 'select f.*, m.role from fish f join memberships m on m.pond_id = f.pond_id and m.user_id = $2 where f.id = $1 limit 1'
    const routes = [
      { label: `GET /api/fish/:id/timeline (first page of ${ENTRIES} entries)`, path: `/api/fish/${fishId}/timeline`, statement: query(timelinePageSql(fishId, { kinds: [], cursor: null, limit: 50 })!), access: fishAccessSql },
      { label: `GET /api/fish/:id/facts (profile header, ${ENTRIES} entries)`, path: `/api/fish/${fishId}/facts`, statement: query(standingFactsSql(fishId, today, today)), access: fishAccessSql },
      { label: `GET /api/ponds/:id/fish (${POND_FISH} fish with K and weight-loss flag)`, path: `/api/ponds/${pondId}/fish`, statement: query(fishListSql(pondId, {})), access: 'select role from memberships where pond_id = $1 and user_id = $2 limit 1' },
      { label: `GET /api/fish/:id/growth (${ENTRIES * 2 / 8} measurements, markers)`, path: `/api/fish/${fishId}/growth`, statement: query(growthSql(fishId)), access: fishAccessSql },
      // The health record reads the whole life in pages of 500, oldest first: the first page is the one that could grow.
      { label: `GET /api/fish/:id/record/entries (first page of 500 of ${ENTRIES})`, path: `/api/fish/${fishId}/record/entries?asOf=${encodeURIComponent(asOf)}&limit=500`, statement: query(recordPageSql(fishId, { asOf, cursor: null, limit: 500 })), access: fishAccessSql },
    ]
    console.log(`Timeline benchmark on loopback, ${SECONDS} s per run (autocannon), SQL timed alone on one connection:`)
    for (const route of routes) {
      const accessId = route.access.includes('memberships where pond_id') ? pondId : fishId
      const sql = await timeSql(pool, 500, async (c) => {
        await c.query(sessionSql, [session.id])
        await c.query(route.access, [accessId, userId])
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
