// What a person at the pond side loads: the fish profile and pond pages rendered on the server, the profile
// and growth APIs each against their own SQL, and the pond list from one process against one per core.
// Run: bash scripts/bench/run.sh pond-side (or with DATABASE_URL of a migrated scratch database).
import { brotliCompressSync } from 'node:zlib'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { growthSql } from '../../server/db/queries/timeline'
import { BUSY_FISH_ENTRIES, seedBusyFish, seedTenFishPond } from './seeds'
import { load, ms, record, sequentialTimes, signInCookie, startBenchServer, timeSql } from './support'

const PORT = Number(process.env.BENCH_PORT ?? 3530)
const REQUESTS = Number(process.env.BENCH_REQUESTS ?? 400)
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10)
const EMAIL = 'bench-pond-side@example.com'
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 4 })
const BROWSER = { 'accept-encoding': 'gzip, deflate, br', 'accept': 'text/html' }

async function pageSize(url: string, cookie: string) {
  const html = await (await fetch(url, { headers: { cookie, 'accept-encoding': 'identity' } })).text()
  const payload = /<script[^>]*id="__NUXT_DATA__"[^>]*>([\s\S]*?)<\/script>/.exec(html)?.[1] ?? ''
  return { bytes: Buffer.byteLength(html), payloadBytes: Buffer.byteLength(payload), brotliBytes: brotliCompressSync(html).length }
}

const kb = (bytes: number) => `${(bytes / 1024).toFixed(0)} KB`

async function main() {
  const { userId, fishId, pondId: bigPondId } = await seedBusyFish(pool, EMAIL)
  const tenFishPondId = await seedTenFishPond(pool, userId)
  const db = drizzle(pool)
  let server = await startBenchServer(PORT)
  try {
    const cookie = await signInCookie(server.url, EMAIL)
    const headers = { ...BROWSER, cookie }
    const { rows: [session] } = await pool.query('select id from sessions where user_id = $1', [userId])
    const sessionSql = 'select s.id, s.created_at, s.last_seen_at, s.revoked_at, u.id, u.name, u.email, u.units, u.decimal_mark from sessions s join users u on u.id = s.user_id where s.id = $1 limit 1'
    const fishAccessSql = 'select f.*, m.role, m.read_only, p.name from fish f join memberships m on m.pond_id = f.pond_id and m.user_id = $2 join ponds p on p.id = f.pond_id where f.id = $1 limit 1'
    console.log(`Pond side, one connection, ${REQUESTS} requests each (timed here), SQL timed alone on one connection:`)

    const profile = await sequentialTimes(`${server.url}/fish/${fishId}`, headers, REQUESTS / 2)
    const size = await pageSize(`${server.url}/fish/${fishId}`, cookie)
    record({ what: `fish profile page GET /fish/:id, ${BUSY_FISH_ENTRIES} entries, 1 connection`, figure: `p50 ${ms(profile.p50)}, p99 ${ms(profile.p99)}, ${profile.requestsPerSecond.toFixed(0)}/s`, comparison: 'before issue 11: p99 113 ms', goal: 'p99 ≤ 40 ms', met: profile.p99 <= 40 && !profile.failures })
    record({ what: 'fish profile page HTML', figure: `${kb(size.bytes)} (payload ${kb(size.payloadBytes)}), ${kb(size.brotliBytes)} brotli`, comparison: 'before issue 11: 179 KB', goal: '≤ 60 KB', met: size.bytes <= 60 * 1024 })

    const pond = await sequentialTimes(`${server.url}/ponds/${tenFishPondId}`, headers, REQUESTS / 2)
    record({ what: 'pond page GET /ponds/:id, 10 fish, 1 connection', figure: `p50 ${ms(pond.p50)}, p99 ${ms(pond.p99)}, ${pond.requestsPerSecond.toFixed(0)}/s`, comparison: 'before issue 11: p99 75 ms', goal: 'p99 ≤ 25 ms', met: pond.p99 <= 25 && !pond.failures })

    const api = await sequentialTimes(`${server.url}/api/fish/${fishId}`, { cookie, 'accept-encoding': 'gzip, br' }, REQUESTS * 2)
    const apiSql = await timeSql(pool, 1000, async (c) => {
      await c.query(sessionSql, [session.id])
      await c.query(fishAccessSql, [fishId, userId])
    })
    record({ what: 'GET /api/fish/:id, 1 connection', figure: `p50 ${ms(api.p50)}, p99 ${ms(api.p99)}`, comparison: `its SQL (session; fish + membership + pond) p50 ${ms(apiSql.p50)}: ${(api.p50 / apiSql.p50).toFixed(1)}×`, goal: '≤ 2× its SQL', met: api.p50 <= 2 * apiSql.p50 && !api.failures })

    const growthQuery = db.dialect.sqlToQuery(growthSql(fishId))
    const growth = await sequentialTimes(`${server.url}/api/fish/${fishId}/growth`, { cookie, 'accept-encoding': 'gzip, br' }, REQUESTS)
    const growthAll = await sequentialTimes(`${server.url}/api/fish/${fishId}/growth?points=all`, { cookie, 'accept-encoding': 'gzip, br' }, REQUESTS / 4)
    const growthSqlTimes = await timeSql(pool, 300, async (c) => {
      await c.query(sessionSql, [session.id])
      await c.query(fishAccessSql, [fishId, userId])
      await c.query(growthQuery.sql, growthQuery.params)
    })
    record({ what: `GET /api/fish/:id/growth, ${BUSY_FISH_ENTRIES / 4} weighings (chart sample), 1 connection`, figure: `p50 ${ms(growth.p50)}, p99 ${ms(growth.p99)}`, comparison: `its SQL p50 ${ms(growthSqlTimes.p50)}, p99 ${ms(growthSqlTimes.p99)}; every point (?points=all) p99 ${ms(growthAll.p99)}; before issue 11: p99 76 ms`, goal: 'p99 ≤ 30 ms', met: growth.p99 <= 30 && !growth.failures })
    console.log(`(failures: profile ${profile.failures}, pond ${pond.failures}, api ${api.failures}, growth ${growth.failures})`)

    // Single process against one per core, the same pond list at ten connections, one after the other. Each is
    // warmed up first with the same load for a few seconds: a freshly started process compiles its code and
    // starts its background work (job queue, the which-fish worker's OpenCV) while the first requests come in.
    const listUrl = `${server.url}/api/ponds/${bigPondId}/fish`
    const warmup = Math.max(3, Math.round(SECONDS / 2))
    await load(listUrl, cookie, warmup, 10)
    const single = await load(listUrl, cookie, SECONDS, 10)
    await server.stop()
    const cores = (await import('node:os')).availableParallelism()
    server = await startBenchServer(PORT, {}, cores)
    const clusterCookie = await signInCookie(server.url, EMAIL)
    await new Promise(done => setTimeout(done, 3000))
    await load(listUrl, clusterCookie, warmup, 10)
    const clustered = await load(listUrl, clusterCookie, SECONDS, 10)
    record({ what: `GET /api/ponds/:id/fish (500 fish), 10 connections, ${cores} processes (npm start)`, figure: `${clustered.requestsPerSecond.toFixed(0)} req/s, p99 ${clustered.p99} ms`, comparison: `1 process in the same run: ${single.requestsPerSecond.toFixed(0)} req/s, p99 ${single.p99} ms (${(clustered.requestsPerSecond / single.requestsPerSecond).toFixed(2)}×)`, goal: '≥ 1.5× one process', met: clustered.requestsPerSecond >= 1.5 * single.requestsPerSecond && !clustered.errors && !clustered.non2xx })
  }
  finally {
    await server.stop()
    await pool.end()
  }
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
