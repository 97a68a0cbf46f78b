// Where the time of the slow paths goes: the built server under `node --cpu-prof`, one kind of request at a
// time (the fish profile page, the pond page, the profile API, the growth API), then the CPU profile summed by
// function and by package, and PostgreSQL's EXPLAIN ANALYZE of the growth query. Not a benchmark (no goal,
// not in `all`): it is how the causes written down in the README were found.
// Run: bash scripts/bench/run.sh profile   (BENCH_PROFILE_REQUESTS per path, default 150)
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { growthSql } from '../../server/db/queries/timeline'
import { seedBusyFish, seedTenFishPond } from './seeds'
import { ms, sequentialTimes, signInCookie, startBenchServer } from './support'

const PORT = Number(process.env.BENCH_PORT ?? 3531)
const REQUESTS = Number(process.env.BENCH_PROFILE_REQUESTS ?? 150)
const EMAIL = 'bench-profile@example.com'
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 })

interface ProfileNode { id: number, callFrame: { functionName: string, url: string, lineNumber: number }, children?: number[] }
interface CpuProfile { nodes: ProfileNode[], samples: number[], timeDeltas: number[] }

/** Where a frame's code lives: a package, Node itself, or our own server bundle. */
function placeOf(url: string) {
  const pkg = /node_modules\/((?:@[^/]+\/)?[^/]+)/.exec(url)?.[1]
  if (pkg) return pkg
  if (url.startsWith('node:') || !url) return url ? 'node' : '(native/gc/idle)'
  if (url.includes('/.output/server/chunks/')) return `app ${url.split('/.output/server/chunks/')[1]}`
  return url.replace(/^file:\/\/.*\/\.output\//, '.output/')
}

function summarise(profile: CpuProfile, top = 18) {
  const byId = new Map(profile.nodes.map(n => [n.id, n]))
  const selfMs = new Map<number, number>()
  profile.samples.forEach((id, i) => selfMs.set(id, (selfMs.get(id) ?? 0) + (profile.timeDeltas[i] ?? 0) / 1000))
  const byFunction = new Map<string, number>()
  const byPlace = new Map<string, number>()
  let total = 0
  for (const [id, time] of selfMs) {
    const { functionName, url, lineNumber } = byId.get(id)!.callFrame
    if (functionName === '(idle)') continue
    total += time
    const place = placeOf(url)
    byFunction.set(`${functionName || '(anonymous)'} ${place}:${lineNumber + 1}`, (byFunction.get(`${functionName || '(anonymous)'} ${place}:${lineNumber + 1}`) ?? 0) + time)
    byPlace.set(place, (byPlace.get(place) ?? 0) + time)
  }
  const rows = (map: Map<string, number>) => [...map].sort((a, b) => b[1] - a[1]).slice(0, top)
    .map(([name, time]) => `    ${(100 * time / total).toFixed(1).padStart(5)} %  ${time.toFixed(0).padStart(6)} ms  ${name}`).join('\n')
  return `  busy (not idle) ${total.toFixed(0)} ms\n  by place:\n${rows(byPlace)}\n  by function (self time):\n${rows(byFunction)}`
}

async function profileOne(label: string, path: string, email: string, headers: Record<string, string>) {
  const dir = mkdtempSync(join(tmpdir(), 'fintrail-cpuprof-'))
  process.env.BENCH_NODE_ARGS = `--cpu-prof --cpu-prof-dir=${dir}`
  const server = await startBenchServer(PORT)
  try {
    const cookie = await signInCookie(server.url, email)
    const times = await sequentialTimes(`${server.url}${path}`, { ...headers, cookie }, REQUESTS, 30)
    console.log(`\n${label} (${REQUESTS} requests, 1 connection, under the profiler): p50 ${ms(times.p50)}, p99 ${ms(times.p99)}`)
  }
  finally {
    await server.stop()
  }
  const file = readdirSync(dir).find(name => name.endsWith('.cpuprofile'))
  if (!file) throw new Error('the server wrote no CPU profile')
  console.log(summarise(JSON.parse(readFileSync(join(dir, file), 'utf8')) as CpuProfile))
  rmSync(dir, { recursive: true, force: true })
}

async function main() {
  const { userId, fishId } = await seedBusyFish(pool, EMAIL)
  const pondId = await seedTenFishPond(pool, userId)
  const page = { 'accept-encoding': 'gzip, deflate, br', 'accept': 'text/html' }
  const api = { 'accept-encoding': 'gzip, br' }
  const only = process.env.BENCH_PROFILE_ONLY
  const paths = [
    { label: 'fish profile page GET /fish/:id', path: `/fish/${fishId}`, headers: page },
    { label: 'pond page GET /ponds/:id', path: `/ponds/${pondId}`, headers: page },
    { label: 'GET /api/fish/:id', path: `/api/fish/${fishId}`, headers: api },
    { label: 'GET /api/fish/:id/growth', path: `/api/fish/${fishId}/growth`, headers: api },
  ].filter(p => !only || p.label.includes(only))
  for (const p of paths) await profileOne(p.label, p.path, EMAIL, p.headers)

  const growth = drizzle(pool).dialect.sqlToQuery(growthSql(fishId))
  const { rows } = await pool.query(`explain (analyze, buffers) ${growth.sql}`, growth.params)
  console.log('\nEXPLAIN ANALYZE of the growth query (1,250 weighings):')
  console.log(rows.map(r => `  ${r['QUERY PLAN']}`).join('\n'))
  await pool.end()
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
