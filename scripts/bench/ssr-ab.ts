// Two builds of the server side by side, the fish profile and pond pages of `pond-side` measured on each in
// turns (A B A B ...), so a change in the machine's other load falls on both. Not in `all`: it compares a
// change with what came before it. BENCH_AB_BASE names the earlier build's server entry (a copied
// .output/server/index.mjs); BENCH_AB_NODE_ARGS_A / _B give each side its own Node flags (default: none), BENCH_AB_DATABASE_URL_B side B
// another way to the same database (a Unix socket).
// Run: BENCH_AB_BASE=/tmp/base/.output/server/index.mjs bash scripts/bench/run.sh ssr-ab
import http from 'node:http'
import { resolve } from 'node:path'
import pg from 'pg'
import { seedBusyFish, seedTenFishPond } from './seeds'
import { cpuAccount, ms, percentileOf, ROOT, signInCookie, startBenchServer } from './support'

const PORT = Number(process.env.BENCH_PORT ?? 3532)
const ROUNDS = Number(process.env.BENCH_AB_ROUNDS ?? 6)
const REQUESTS = Number(process.env.BENCH_AB_REQUESTS ?? 100)
const EMAIL = 'bench-ssr-ab@example.com'
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 })
const BROWSER = { 'accept-encoding': 'gzip, deflate, br', 'accept': 'text/html' }

async function startSide(name: string, entry: string, port: number, nodeArgs: string, env: Record<string, string> = {}) {
  process.env.BENCH_SERVER_ENTRY = entry
  process.env.BENCH_NODE_ARGS = nodeArgs
  const server = await startBenchServer(port, env)
  return { name, server, cookie: await signInCookie(server.url, EMAIL), times: { profile: [] as number[], pond: [] as number[] }, cpu: { profile: 0, pond: 0 } }
}

// One kept-alive connection per side, as sequentialTimes uses within one call.
const agents = new Map<string, http.Agent>()

/** Each request's time, kept whole, so the p99 is over every request of every round. */
async function timesOf(url: string, headers: Record<string, string>, requests: number) {
  const origin = new URL(url).origin
  if (!agents.has(origin)) agents.set(origin, new http.Agent({ keepAlive: true, maxSockets: 1 }))
  const agent = agents.get(origin)!
  const once = () => new Promise<number>((done, fail) => {
    http.get(url, { agent, headers }, (response) => {
      response.on('data', () => {})
      response.on('end', () => done(response.statusCode!))
      response.on('error', fail)
    }).on('error', fail)
  })
  const times: number[] = []
  for (let i = 0; i < requests; i++) {
    const started = performance.now()
    if (await once() !== 200) throw new Error(`${url} failed`)
    times.push(performance.now() - started)
  }
  return times
}

async function main() {
  const base = process.env.BENCH_AB_BASE
  if (!base) throw new Error('BENCH_AB_BASE: the server entry of the build to compare with')
  const { userId, fishId } = await seedBusyFish(pool, EMAIL)
  const pondId = await seedTenFishPond(pool, userId)
  const sides = [
    await startSide('A (base)', base, PORT, process.env.BENCH_AB_NODE_ARGS_A ?? ''),
    await startSide('B (this tree)', resolve(ROOT, '.output/server/index.mjs'), PORT + 2, process.env.BENCH_AB_NODE_ARGS_B ?? '',
      process.env.BENCH_AB_DATABASE_URL_B ? { NUXT_DATABASE_URL: process.env.BENCH_AB_DATABASE_URL_B } : {}),
  ]
  try {
    for (const side of sides) {
      await timesOf(`${side.server.url}/fish/${fishId}`, { ...BROWSER, cookie: side.cookie }, 40)
      await timesOf(`${side.server.url}/ponds/${pondId}`, { ...BROWSER, cookie: side.cookie }, 40)
    }
    console.log(`load average before: ${process.env.BENCH_LOAD_START}`)
    for (let round = 0; round < ROUNDS; round++) {
      for (const side of round % 2 ? [...sides].reverse() : sides) {
        // The server's CPU time per page is less at the mercy of the machine's other load than the page's wall time.
        let cpu = await cpuAccount(side.server.pid, pool)
        side.times.profile.push(...await timesOf(`${side.server.url}/fish/${fishId}`, { ...BROWSER, cookie: side.cookie }, REQUESTS))
        side.cpu.profile += (await cpu()).server
        cpu = await cpuAccount(side.server.pid, pool)
        side.times.pond.push(...await timesOf(`${side.server.url}/ponds/${pondId}`, { ...BROWSER, cookie: side.cookie }, REQUESTS))
        side.cpu.pond += (await cpu()).server
      }
    }
    const loadAfter = (await import('node:fs')).readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ')
    for (const side of sides) {
      const line = (label: string, t: number[], cpuSeconds: number) => `${label} p50 ${ms(percentileOf(t, 0.5))}, p90 ${ms(percentileOf(t, 0.9))}, p99 ${ms(percentileOf(t, 0.99))} (${t.length}), server CPU ${ms(1000 * cpuSeconds / t.length)} a page`
      console.log(`${side.name}: ${line('profile', side.times.profile, side.cpu.profile)}; ${line('pond', side.times.pond, side.cpu.pond)}`)
    }
    console.log(`load average after: ${loadAfter}`)
  }
  finally {
    for (const agent of agents.values()) agent.destroy()
    for (const side of sides) await side.server.stop()
    await pool.end()
  }
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
