// Shared pieces of the benchmarks: a built server on its own port, a signed-in cookie, autocannon and SQL timing.
import { spawn } from 'node:child_process'
import { appendFileSync, readdirSync, readFileSync } from 'node:fs'
import http from 'node:http'
import { resolve } from 'node:path'
import autocannon from 'autocannon'
import { Placeholder, sql } from 'drizzle-orm'
import type pg from 'pg'
import { fishAccessWithSessionQuery, pondAccessWithSessionQuery } from '../../server/db/queries/access'

export const ROOT = resolve(import.meta.dirname, '../..')
export const BENCH_PASSWORD = 'benchmark pond password'

// A benchmark that fails part-way must not leave its servers running: one still holding a port answered the
// next run's requests in place of the server that run had started.
const running = new Set<ReturnType<typeof spawn>>()
process.on('exit', () => {
  for (const child of running) child.kill('SIGTERM')
})

/** SIGTERM, and resolves when the process (with its cluster workers) has gone and the port is free. */
function stopChild(child: ReturnType<typeof spawn>) {
  const gone = new Promise<void>(done => (child.exitCode != null ? done() : child.once('exit', () => done())))
  child.kill('SIGTERM')
  return gone
}

/** The built server on its own port; `workers` > 1 runs it as `npm start` does, one process per core (scripts/cluster.mjs). */
export async function startBenchServer(port: number, extraEnv: Record<string, string> = {}, workers = 1) {
  const entry = process.env.BENCH_SERVER_ENTRY ?? resolve(ROOT, '.output/server/index.mjs')
  // BENCH_NODE_ARGS="--cpu-prof --cpu-prof-dir=/tmp/prof" profiles the server (written when it stops).
  const nodeArgs = (process.env.BENCH_NODE_ARGS ?? '').split(' ').filter(Boolean)
  const args = [...nodeArgs, ...(workers > 1 ? [resolve(ROOT, 'scripts/cluster.mjs'), entry] : [entry])]
  const child = spawn(process.execPath, args, {
    cwd: ROOT,
    env: {
      ...process.env, NODE_ENV: 'production', HOST: '127.0.0.1', NITRO_HOST: '127.0.0.1', PORT: String(port), NITRO_PORT: String(port),
      NUXT_DATABASE_URL: process.env.DATABASE_URL, NUXT_SESSION_COOKIE_SECURE: 'false', NUXT_APP_ORIGIN: `http://127.0.0.1:${port}`,
      NUXT_STORAGE_DIR: process.env.BENCH_STORAGE_DIR, FINTRAIL_WORKERS: String(workers),
      // As scripts/lib/common.sh sets it for every server start (photo processing; see there).
      MALLOC_ARENA_MAX: process.env.MALLOC_ARENA_MAX ?? '2', ...extraEnv,
    },
    stdio: ['ignore', 'inherit', 'inherit'],
  })
  running.add(child)
  child.once('exit', () => running.delete(child))
  const url = `http://127.0.0.1:${port}`
  for (let i = 0; i < 200; i++) {
    try {
      if ((await fetch(`${url}/api/health`)).ok) return { url, pid: child.pid!, stop: () => stopChild(child) }
    }
    catch { /* starting */ }
    await new Promise(r => setTimeout(r, 100))
  }
  child.kill('SIGKILL')
  throw new Error('bench server did not start')
}

/** A helper server of the benchmarks (a script under ROOT) in its own process, ready once it prints its first line. */
export async function startHelperServer(script: string, env: Record<string, string>) {
  const child = spawn(process.execPath, [resolve(ROOT, script)], { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'inherit'] })
  running.add(child)
  child.once('exit', () => running.delete(child))
  await new Promise<void>((ready, fail) => {
    child.stdout!.once('data', () => ready())
    child.once('exit', code => fail(new Error(`${script} exited (${code})`)))
  })
  return { stop: () => stopChild(child) }
}

export async function signInCookie(url: string, email: string) {
  const response = await fetch(`${url}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: BENCH_PASSWORD }) })
  if (!response.ok) throw new Error(`sign-in failed: ${response.status}`)
  return response.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
}

export interface LoadResult { p50: number, p99: number, requestsPerSecond: number, requests: number, errors: number, non2xx: number }

export async function load(url: string, cookie: string, seconds = 10, connections = 10): Promise<LoadResult> {
  const result = await autocannon({ url, connections, duration: seconds, headers: { cookie } })
  return { p50: result.latency.p50, p99: result.latency.p99, requestsPerSecond: result.requests.average, requests: result.requests.total, errors: result.errors, non2xx: result.non2xx }
}

/** Runs the same SQL the route runs, one statement after another, and returns per-run milliseconds. */
export async function timeSql(pool: pg.Pool, runs: number, once: (client: pg.PoolClient) => Promise<unknown>) {
  const client = await pool.connect()
  const times: number[] = []
  try {
    for (let i = 0; i < 20; i++) await once(client)
    for (let i = 0; i < runs; i++) {
      const start = performance.now()
      await once(client)
      times.push(performance.now() - start)
    }
  }
  finally {
    client.release()
  }
  times.sort((a, b) => a - b)
  return { p50: times[Math.floor(runs * 0.5)]!, p99: times[Math.floor(runs * 0.99)]! }
}

export function report(label: string, api: LoadResult, sql: { p50: number, p99: number }) {
  console.log(`${label}: API p50 ${api.p50} ms, p99 ${api.p99} ms, ${Math.round(api.requestsPerSecond)} req/s (errors ${api.errors}, non-2xx ${api.non2xx}); `
    + `SQL p50 ${sql.p50.toFixed(2)} ms, p99 ${sql.p99.toFixed(2)} ms; API/SQL at p50 ${(Math.max(api.p50, 0.5) / sql.p50).toFixed(1)}x`)
}

const CLOCK_TICKS_PER_SECOND = 100

/** CPU seconds (user + system) each process has used so far, from /proc/<pid>/stat (fields 14 and 15). */
export function cpuSecondsByPid(pids: Iterable<number>) {
  const seconds = new Map<number, number>()
  for (const pid of pids) {
    try {
      const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').replace(/^.*\) /, '').split(' ')
      seconds.set(pid, (Number(fields[11]) + Number(fields[12])) / CLOCK_TICKS_PER_SECOND)
    }
    catch { /* gone */ }
  }
  return seconds
}

/** A process and every process below it (the cluster's workers below its primary). */
function processTree(root: number) {
  const parentOf = new Map<number, number>()
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue
    try {
      parentOf.set(Number(entry), Number(readFileSync(`/proc/${entry}/stat`, 'utf8').replace(/^.*\) /, '').split(' ')[1]))
    }
    catch { /* gone */ }
  }
  const tree = new Set([root])
  for (let grew = true; grew;) {
    grew = false
    for (const [pid, parent] of parentOf) {
      if (tree.has(parent) && !tree.has(pid)) {
        tree.add(pid)
        grew = true
      }
    }
  }
  return tree
}

/**
 * Where the CPU time of a load run goes: the server's processes, the PostgreSQL backends serving this database,
 * and this process (the load generator). Call before the run; the returned function gives the CPU seconds of each.
 */
export async function cpuAccount(serverPid: number, pool: pg.Pool) {
  const backends = async () => (await pool.query<{ pid: number }>('select pid from pg_stat_activity where datname = current_database()')).rows.map(r => r.pid)
  const serverBefore = cpuSecondsByPid(processTree(serverPid))
  const databaseBefore = cpuSecondsByPid(await backends())
  const selfBefore = process.cpuUsage()
  const sumSince = (before: Map<number, number>, after: Map<number, number>) => [...after].reduce((sum, [pid, s]) => sum + s - (before.get(pid) ?? 0), 0)
  return async () => {
    const self = process.cpuUsage(selfBefore)
    return {
      server: sumSince(serverBefore, cpuSecondsByPid(processTree(serverPid))),
      database: sumSince(databaseBefore, cpuSecondsByPid(new Set([...databaseBefore.keys(), ...await backends()]))),
      loadGenerator: (self.user + self.system) / 1e6,
    }
  }
}

/** Peak resident memory of a process so far, in MiB (VmHWM from /proc). */
export function peakMemoryMiB(pid: number) {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8')
  return Number(status.match(/VmHWM:\s+(\d+) kB/)![1]) / 1024
}

/** One line of the table `npm run bench` prints at the end: a figure beside what it is compared with. */
export interface BenchRow {
  what: string
  figure: string
  comparison: string
  goal: string
  /** null when the row has no goal of its own (a reference figure). */
  met: boolean | null
}

/** Prints the row now and keeps it for run.sh's closing table (BENCH_RESULTS names a JSON Lines file). */
export function record(row: BenchRow) {
  const verdict = row.met == null ? '' : row.met ? ' [met]' : ' [NOT met]'
  console.log(`  ${row.what}: ${row.figure} | ${row.comparison} | goal ${row.goal}${verdict}`)
  if (process.env.BENCH_RESULTS) appendFileSync(process.env.BENCH_RESULTS, JSON.stringify({ benchmark: process.env.BENCH_NAME ?? '', ...row }) + '\n')
}

export const percentileOf = (values: number[], p: number) => [...values].sort((a, b) => a - b)[Math.min(values.length - 1, Math.ceil(values.length * p) - 1)]!

/**
 * One connection, one request after another, timed in this process with sub-millisecond resolution
 * (autocannon rounds to whole milliseconds, too coarse beside a 1 ms SQL figure). The body is read in full.
 */
export async function sequentialTimes(url: string, headers: Record<string, string>, requests: number, warmup = 20) {
  const agent = new http.Agent({ keepAlive: true, maxSockets: 1 })
  const once = () => new Promise<{ status: number, bytes: number }>((done, fail) => {
    http.get(url, { agent, headers }, (response) => {
      let bytes = 0
      response.on('data', (part: Buffer) => (bytes += part.length))
      response.on('end', () => done({ status: response.statusCode!, bytes }))
      response.on('error', fail)
    }).on('error', fail)
  })
  for (let i = 0; i < warmup; i++) await once()
  const times: number[] = []
  let failures = 0
  const started = performance.now()
  for (let i = 0; i < requests; i++) {
    const t0 = performance.now()
    const { status } = await once()
    times.push(performance.now() - t0)
    if (status !== 200) failures++
  }
  const seconds = (performance.now() - started) / 1000
  agent.destroy()
  return { p50: percentileOf(times, 0.5), p90: percentileOf(times, 0.9), p99: percentileOf(times, 0.99), requestsPerSecond: requests / seconds, failures }
}

export const ms = (value: number) => `${value < 10 ? value.toFixed(2) : value.toFixed(1)} ms`

/**
 * The one statement a hot read (a fish, its growth and timeline; a pond and its fish list) runs before its own
 * query: session row, user, membership (and the fish), built by the server's own function in
 * server/db/queries/access.ts and prepared under the name the server gives it, so a benchmark times the SQL the
 * route sends.
 */
export function hotReadAccess(db: Parameters<typeof fishAccessWithSessionQuery>[0], kind: 'fish' | 'pond', sessionId: string, id: string) {
  const query = kind === 'fish'
    ? fishAccessWithSessionQuery(db, sql.placeholder('sessionId'), sql.placeholder('id'))
    : pondAccessWithSessionQuery(db, sql.placeholder('sessionId'), sql.placeholder('id'))
  const { sql: text, params } = query.toSQL()
  const values = params.map(p => (p instanceof Placeholder ? (p.name === 'sessionId' ? sessionId : id) : p))
  return { name: `${kind}_access_with_session`, text, values }
}
