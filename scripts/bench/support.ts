// Shared pieces of the benchmarks: a built server on its own port, a signed-in cookie, autocannon and SQL timing.
import { spawn } from 'node:child_process'
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import autocannon from 'autocannon'
import type pg from 'pg'

export const ROOT = resolve(import.meta.dirname, '../..')
export const BENCH_PASSWORD = 'benchmark pond password'

export async function startBenchServer(port: number, extraEnv: Record<string, string> = {}) {
  const child = spawn(process.execPath, [process.env.BENCH_SERVER_ENTRY ?? resolve(ROOT, '.output/server/index.mjs')], {
    cwd: ROOT,
    env: {
      ...process.env, NODE_ENV: 'production', HOST: '127.0.0.1', NITRO_HOST: '127.0.0.1', PORT: String(port), NITRO_PORT: String(port),
      NUXT_DATABASE_URL: process.env.DATABASE_URL, NUXT_SESSION_COOKIE_SECURE: 'false', NUXT_APP_ORIGIN: `http://127.0.0.1:${port}`,
      NUXT_STORAGE_DIR: process.env.BENCH_STORAGE_DIR, ...extraEnv,
    },
    stdio: ['ignore', 'inherit', 'inherit'],
  })
  const url = `http://127.0.0.1:${port}`
  for (let i = 0; i < 200; i++) {
    try {
      if ((await fetch(`${url}/api/health`)).ok) return { url, pid: child.pid!, stop: () => child.kill('SIGTERM') }
    }
    catch { /* starting */ }
    await new Promise(r => setTimeout(r, 100))
  }
  child.kill('SIGKILL')
  throw new Error('bench server did not start')
}

export async function signInCookie(url: string, email: string) {
  const response = await fetch(`${url}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: BENCH_PASSWORD }) })
  if (!response.ok) throw new Error(`sign-in failed: ${response.status}`)
  return response.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
}

export interface LoadResult { p50: number, p99: number, requestsPerSecond: number, errors: number, non2xx: number }

export async function load(url: string, cookie: string, seconds = 10, connections = 10): Promise<LoadResult> {
  const result = await autocannon({ url, connections, duration: seconds, headers: { cookie } })
  return { p50: result.latency.p50, p99: result.latency.p99, requestsPerSecond: result.requests.average, errors: result.errors, non2xx: result.non2xx }
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

/** Peak resident memory of a process so far, in MiB (VmHWM from /proc). */
export function peakMemoryMiB(pid: number) {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8')
  return Number(status.match(/VmHWM:\s+(\d+) kB/)![1]) / 1024
}
