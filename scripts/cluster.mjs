// Runs the built server once per core behind one port (node:cluster: the primary accepts connections and
// hands them to the workers in turn). Everything the processes must agree on already lives in PostgreSQL:
// sessions, the sign-in failure counts, the job queue (pg-boss takes each job once with SKIP LOCKED) and the
// per-upload advisory locks of photo processing. What stays per process is only a cap on local work
// (photos processed at once, worker threads), so each worker gets its share of the machine.
// Usage: node scripts/cluster.mjs [.output/server/index.mjs]   (FINTRAIL_WORKERS sets the count; default: cores)
import cluster from 'node:cluster'
import { availableParallelism } from 'node:os'
import { resolve } from 'node:path'
import { pathToFileURL } from 'node:url'

const entry = resolve(process.argv[2] ?? '.output/server/index.mjs')
const workers = Math.max(1, Number(process.env.FINTRAIL_WORKERS) || availableParallelism())

if (cluster.isPrimary) {
  // Read by server/utils/process-share.ts in every worker.
  process.env.FINTRAIL_WORKER_COUNT = String(workers)
  let stopping = false
  const started = new Map()
  const fork = () => started.set(cluster.fork().id, Date.now())
  for (let i = 0; i < workers; i++) fork()
  cluster.on('exit', (worker, code, signal) => {
    if (stopping) {
      // process.exitCode, set by stop(): 1 when a worker could not start.
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit()
      return
    }
    // A worker that dies at once would die again: stop everything rather than loop.
    const lived = Date.now() - (started.get(worker.id) ?? 0)
    console.error(`[cluster] worker ${worker.process.pid} exited (${signal ?? code}) after ${Math.round(lived / 1000)} s`)
    if (lived < 5000) {
      console.error('[cluster] it did not stay up for 5 s: stopping')
      stop('SIGTERM', 1)
      return
    }
    fork()
  })
  function stop(signal, exitCode = 0) {
    if (stopping) return
    stopping = true
    process.exitCode = exitCode
    for (const worker of Object.values(cluster.workers ?? {})) worker?.process.kill(signal)
    // Workers finish their open requests first; after 15 s nothing is left waiting.
    setTimeout(() => process.exit(exitCode), 15_000).unref()
    if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(exitCode)
  }
  process.on('SIGINT', () => stop('SIGTERM'))
  process.on('SIGTERM', () => stop('SIGTERM'))
}
else {
  await import(pathToFileURL(entry).href)
}
