import PgBoss from 'pg-boss'
import { sql, type SQL } from 'drizzle-orm'

/**
 * Background jobs kept in PostgreSQL by pg-boss (schema `pgboss` of the app's database), so a job
 * sent survives a restart of the app. An area adds a worker with `registerJob` (in a Nitro plugin)
 * and sends work with `sendJob`, inside its own transaction when the job must exist exactly when
 * the write does.
 */
export interface JobOptions {
  /** Attempts after the first one. */
  retryLimit?: number
  /** Seconds before the first retry; doubled on each retry when `retryBackoff` is on. */
  retryDelay?: number
  retryBackoff?: boolean
  /** A job still running after this long is counted as failed (and retried). */
  expireInSeconds?: number
  /** How often an idle worker looks for new jobs. */
  pollingIntervalSeconds?: number
  /** Jobs of this name run at once in this process. */
  concurrency?: number
  /** pg-boss queue policy: 'short' keeps one waiting job per singletonKey (a second send is dropped). */
  policy?: 'standard' | 'short' | 'singleton' | 'stately'
}

export interface JobContext { id: string, retryCount: number, retryLimit: number, isLastAttempt: boolean }
/** What a handler returns is kept as the job's output (read with `jobOutput`). */
export type JobHandler<T> = (data: T, job: JobContext) => Promise<unknown>

interface Registration { name: string, handler: JobHandler<never>, options: JobOptions }

const JOB_DEFAULTS: Required<JobOptions> = { retryLimit: 5, retryDelay: 5, retryBackoff: true, expireInSeconds: 300, pollingIntervalSeconds: 2, concurrency: 1, policy: 'standard' }
const registrations = new Map<string, Registration>()
// This process's workers per job name, to wake them at once for work just sent from here.
const workerIds = new Map<string, string[]>()
const whenStarted: ((boss: PgBoss) => Promise<unknown>)[] = []
let starting: Promise<PgBoss> | undefined
let boss: PgBoss | undefined

async function startWorker(instance: PgBoss, { name, handler, options }: Registration) {
  const settings = { ...JOB_DEFAULTS, ...options }
  // createQueue keeps an existing queue; updateQueue applies changed retry settings to it.
  await instance.createQueue(name, { name, policy: settings.policy, retryLimit: settings.retryLimit, retryDelay: settings.retryDelay, retryBackoff: settings.retryBackoff, expireInSeconds: settings.expireInSeconds })
  await instance.updateQueue(name, { name, retryLimit: settings.retryLimit, retryDelay: settings.retryDelay, retryBackoff: settings.retryBackoff, expireInSeconds: settings.expireInSeconds })
  const work = () => instance.work<unknown>(name, { batchSize: 1, includeMetadata: true, pollingIntervalSeconds: settings.pollingIntervalSeconds }, async ([job]) => {
    if (!job) return
    return (handler as JobHandler<unknown>)(job.data, { id: job.id, retryCount: job.retryCount, retryLimit: job.retryLimit, isLastAttempt: job.retryCount >= job.retryLimit })
  })
  const ids: string[] = []
  for (let i = 0; i < Math.max(1, settings.concurrency); i++) ids.push(await work())
  workerIds.set(name, ids)
}

/** The started pg-boss; the first call starts it (Nitro does not wait for async plugins). */
export function getBoss(): Promise<PgBoss> {
  starting ??= (async () => {
    const url = useRuntimeConfig().databaseUrl || process.env.DATABASE_URL
    if (!url) throw new Error('NUXT_DATABASE_URL is not set')
    const instance = new PgBoss({ connectionString: String(url), schema: jobsSchema(), max: 4, application_name: 'fintrail-jobs' })
    // Without a listener an 'error' event would end the process (e.g. while the database restarts).
    instance.on('error', error => console.error('[jobs]', error.message))
    try {
      await instance.start()
      for (const registration of registrations.values()) await startWorker(instance, registration)
      for (const started of whenStarted) await started(instance)
    }
    catch (error) {
      // A start that failed half-way leaves no pool or timers behind; the caller tries again.
      await instance.stop({ graceful: false, wait: false }).catch(() => undefined)
      throw error
    }
    boss = instance
    console.info('[jobs] running')
    return instance
  })().catch((error) => {
    starting = undefined // the next call tries again (the database may have been down)
    throw error
  })
  return starting
}

/** Work to do each time the runner starts (a schedule to keep), after the workers: a failure fails the start. */
export function whenJobsStart(started: (boss: PgBoss) => Promise<unknown>) {
  whenStarted.push(started)
}

/**
 * Starts the runner and keeps trying, with a growing pause, until it runs: the database may be down, or several
 * instances starting at once may create pg-boss's tables together and one of them lose a deadlock.
 */
export async function startJobsUntilRunning(stillWanted: () => boolean) {
  for (let pause = 1000; stillWanted(); pause = Math.min(pause * 2, 30_000)) {
    try {
      await getBoss()
      return
    }
    catch (error) {
      console.error(`[jobs] could not start (trying again in ${pause / 1000} s):`, error instanceof Error ? error.message : error)
      await new Promise(resolve => setTimeout(resolve, pause))
    }
  }
}

/** Adds a worker for the jobs called `name`; a handler that throws is retried with backoff. */
export function registerJob<T>(name: string, handler: JobHandler<T>, options: JobOptions = {}) {
  const registration: Registration = { name, handler: handler as JobHandler<never>, options }
  registrations.set(name, registration)
  if (boss) startWorker(boss, registration).catch(error => console.error(`[jobs] could not start ${name}:`, error))
}

/**
 * Wakes this process's idle workers of `name` instead of leaving them to their next poll: for a job sent here that a
 * person is waiting on. Any instance may still take it (the first to fetch it wins).
 */
export function wakeWorkers(name: string) {
  if (!boss) return
  for (const id of workerIds.get(name) ?? []) boss.notifyWorker(id)
}

/** A pg-boss executor that runs its statements on a Drizzle transaction (or the pool). */
function executorFor(tx: Tx | Db): PgBoss.Db {
  return {
    async executeSql(text, values) {
      // pg-boss writes $1..$n placeholders; Drizzle's sql template binds the same values in order.
      const parts = text.split(/\$(\d+)/)
      const chunks: SQL[] = parts.map((part, i) => i % 2 ? sql`${values[Number(part) - 1] ?? null}` : sql.raw(part))
      const result = await tx.execute(sql.join(chunks))
      return { rows: result.rows }
    },
  }
}

/**
 * Sends a job; with `tx` the job is written in that transaction, so it exists if and only if the
 * transaction commits. `singletonKey` makes a second send of the same key a no-op while one waits.
 */
export async function sendJob(name: string, data: object, options: { tx?: Tx, singletonKey?: string, startAfterSeconds?: number } = {}) {
  const instance = await getBoss()
  return instance.send(name, data, {
    ...(options.tx ? { db: executorFor(options.tx) } : {}),
    ...(options.singletonKey ? { singletonKey: options.singletonKey } : {}),
    ...(options.startAfterSeconds ? { startAfter: options.startAfterSeconds } : {}),
  })
}

/** What a finished job's handler returned (undefined while it waits or runs, or once pg-boss has archived it). */
export async function jobOutput(name: string, id: string): Promise<unknown> {
  const job = await (await getBoss()).getJobById(name, id)
  return job?.state === 'completed' ? job.output : undefined
}

function jobsSchema() {
  const name = String(useRuntimeConfig().jobsSchema || 'pgboss')
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`NUXT_JOBS_SCHEMA "${name}" is not a plain schema name`)
  return name
}

/** Jobs waiting to run (all queues), and how long the oldest has waited: for /api/health. */
export async function queueBacklog(): Promise<{ waiting: number, oldestSeconds: number }> {
  const result = await usePool().query<{ waiting: string, oldest: number | null }>(
    `select count(*) as waiting, extract(epoch from now() - min(created_on))::float8 as oldest
       from ${jobsSchema()}.job where state in ('created', 'retry') and start_after <= now()`)
  const row = result.rows[0]
  return { waiting: Number(row?.waiting ?? 0), oldestSeconds: Math.max(0, Math.round(row?.oldest ?? 0)) }
}

export async function stopJobs() {
  const instance = boss
  boss = undefined
  starting = undefined
  workerIds.clear()
  // pg-boss waits at least 1 s; a job still running then is failed back to the queue ("retry") for another instance.
  const grace = Number(useRuntimeConfig().jobsStopGraceSeconds)
  await instance?.stop({ graceful: true, timeout: Number.isFinite(grace) ? grace * 1000 : 5000, wait: true })
}
