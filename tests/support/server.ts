import { spawn, type ChildProcess } from 'node:child_process'
import { mkdirSync } from 'node:fs'
import { resolve } from 'node:path'
import { ROOT, testClockSecret, testEnv } from './env'

export interface RunningServer {
  url: string
  process: ChildProcess
  stop: () => Promise<void>
  kill: () => Promise<void>
  output: () => string
}

/** Starts the built production server (.output) on its own port against the test database. */
/** extraEnv values of null remove a variable the test server would otherwise set. */
/** `acceptUnhealthy`: ready once it answers at all (for a server started with a broken part on purpose). */
/** `cluster`: as `npm start` runs it, through scripts/cluster.mjs (one process per core). */
export async function startServer(port: number, extraEnv: Record<string, string | null> = {}, options: { acceptUnhealthy?: boolean, cluster?: boolean } = {}): Promise<RunningServer> {
  const env = testEnv()
  mkdirSync(env.storageDir, { recursive: true })
  let output = ''
  const baseEnv: Record<string, string | undefined> = {
    ...process.env,
    NODE_ENV: 'production',
    HOST: '127.0.0.1',
    NITRO_HOST: '127.0.0.1',
    PORT: String(port),
    NITRO_PORT: String(port),
    NUXT_DATABASE_URL: env.databaseUrl,
    NUXT_SESSION_PASSWORD: env.sessionPassword,
    NUXT_SESSION_COOKIE_SECURE: 'false',
    NUXT_APP_ORIGIN: `http://127.0.0.1:${port}`,
    NUXT_SMTP_PORT: String(env.smtpPort),
    NUXT_STORAGE_DIR: env.storageDir,
    NUXT_TRUST_PROXY: 'true',
    NUXT_SIGN_IN_IP_LIMIT: '30',
    NUXT_TEST_CLOCK: testClockSecret(),
    // As scripts/lib/common.sh sets it for every server start (photo processing; see there).
    MALLOC_ARENA_MAX: process.env.MALLOC_ARENA_MAX ?? '2',
  }
  // A server with storage of its own keeps its jobs to itself: a job names files only its own storage holds,
  // and the shared test database would otherwise hand it to the main test server.
  if (extraEnv.NUXT_STORAGE_DIR && extraEnv.NUXT_JOBS_SCHEMA === undefined) baseEnv.NUXT_JOBS_SCHEMA = `pgboss_${port}`
  const childEnv = Object.fromEntries(Object.entries({ ...baseEnv, ...extraEnv }).filter(([, value]) => value !== null))
  // FINTRAIL_SERVER_ENTRY points at a copy of a build, so a rebuild in the checkout cannot pull it away mid-run.
  const entry = process.env.FINTRAIL_SERVER_ENTRY ?? resolve(ROOT, '.output/server/index.mjs')
  const child = spawn(process.execPath, options.cluster ? [resolve(ROOT, 'scripts/cluster.mjs'), entry] : [entry], {
    cwd: ROOT,
    env: childEnv,
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  child.stdout!.on('data', (d: Buffer) => (output += d.toString()))
  child.stderr!.on('data', (d: Buffer) => (output += d.toString()))
  const url = `http://127.0.0.1:${port}`
  const exited = new Promise<void>(done => child.once('exit', () => done()))
  // Generous: on a machine busy with other builds a start has taken over 30 s.
  const deadline = Date.now() + 60_000
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early (status ${child.exitCode}):\n${output}`)
    try {
      const response = await fetch(`${url}/api/health`)
      if (response.ok || (options.acceptUnhealthy && response.status === 503)) break
    }
    catch { /* not listening yet */ }
    if (Date.now() > deadline) {
      // Not left running: a stray server would hold the port for the next run.
      child.kill('SIGKILL')
      throw new Error(`server did not start on ${url}:\n${output}`)
    }
    await new Promise(r => setTimeout(r, 150))
  }
  const end = async (signal: NodeJS.Signals) => {
    if (child.exitCode === null && child.signalCode === null) child.kill(signal)
    // A server stuck in its shutdown must not outlive the test and answer the next one on this port.
    const stuck = setTimeout(() => child.kill('SIGKILL'), 15_000)
    await exited
    clearTimeout(stuck)
  }
  return { url, process: child, stop: () => end('SIGTERM'), kill: () => end('SIGKILL'), output: () => output }
}
