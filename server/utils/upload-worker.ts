import { existsSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import type { H3Event } from 'h3'
import Piscina from 'piscina'
import { perProcessShare } from './process-share'
import type { Spreadsheet } from '../workers/spreadsheet-read'
import type { UploadTask, UploadTaskResult } from '../workers/upload-task'

// Spreadsheets and archives are parsed on one thread per machine (split between the processes of the
// per-core cluster, at least one each), capped in memory and running at a lower priority than the event
// loop: on two cores the server keeps one core for its requests while a file is read. More uploads wait in
// a short queue, holding only a temporary file's path; beyond it they are told to try again (503).
export const UPLOAD_WORKER_LIMITS = {
  threads: 1,
  queue: 16,
  heapMb: 128,
  spreadsheetSeconds: 60,
  archiveSeconds: 15 * 60,
  retryAfterSeconds: 30,
} as const

let pool: Piscina | undefined

/** The bundled worker sits in workers/ beside the built server's entry; route chunks are folders below it. */
function workerFile() {
  const starts = [dirname(fileURLToPath(import.meta.url)), process.argv[1] ? dirname(process.argv[1]) : '']
  for (const start of starts) {
    let dir = start
    for (let depth = 0; dir && depth < 6; depth++, dir = dirname(dir)) {
      const candidate = join(dir, 'workers/upload-parser.mjs')
      if (existsSync(candidate)) return candidate
    }
  }
  throw new Error('The upload worker (workers/upload-parser.mjs) is missing from the built server: run nuxt build')
}

function uploadPool() {
  pool ??= new Piscina({
    filename: workerFile(),
    minThreads: 0,
    maxThreads: threadCount(),
    // Tasks wait in `slot` before they reach the pool, so a task's time limit starts when it runs.
    maxQueue: UPLOAD_WORKER_LIMITS.queue,
    idleTimeout: 30_000,
    resourceLimits: { maxOldGenerationSizeMb: UPLOAD_WORKER_LIMITS.heapMb, maxYoungGenerationSizeMb: 16, stackSizeMb: 4 },
  })
  return pool
}

const threadCount = () => perProcessShare(UPLOAD_WORKER_LIMITS.threads)
let running = 0
const waiting: (() => void)[] = []

/** Waits for a free parser thread; refuses (503, with Retry-After) when the queue is full. */
async function slot(event: H3Event, field: string) {
  if (running >= threadCount()) {
    if (waiting.length >= UPLOAD_WORKER_LIMITS.queue) {
      setResponseHeader(event, 'Retry-After', UPLOAD_WORKER_LIMITS.retryAfterSeconds)
      throw refused(503, 'Too many files are being read right now: try again in a minute', field)
    }
    await new Promise<void>(resolve => waiting.push(resolve))
  }
  running++
  return () => {
    running--
    waiting.shift()?.()
  }
}

function refused(status: number, message: string, field: string, problems: unknown[] = []) {
  return createError({
    statusCode: status,
    statusMessage: status === 413 ? 'Too large' : status === 503 ? 'Busy' : 'Invalid input',
    message,
    data: { fieldErrors: { [field]: [message] }, ...(problems.length ? { problems } : {}) },
  })
}

async function run(event: H3Event, task: UploadTask, seconds: number, field: string, what: string): Promise<UploadTaskResult> {
  const release = await slot(event, field)
  try {
    return await uploadPool().run(task, { signal: AbortSignal.timeout(seconds * 1000) }) as UploadTaskResult
  }
  catch (error) {
    const { code, name } = error as { code?: string, name?: string }
    if (code === 'ERR_WORKER_OUT_OF_MEMORY') throw refused(413, `The ${what} needs more memory to read than one upload may use (${UPLOAD_WORKER_LIMITS.heapMb} MB)`, field)
    if (name === 'AbortError' || name === 'TimeoutError') throw refused(413, `The ${what} took longer than ${seconds} seconds to read`, field)
    throw error
  }
  finally {
    release()
  }
}

/** A spreadsheet as columns and rows, read in the upload worker; refusals become 4xx answers. */
export async function parseSpreadsheet(event: H3Event, file: { name: string, path: string }, sheet?: string, sampleRows?: number): Promise<Spreadsheet> {
  const result = await run(event, { kind: 'spreadsheet', name: file.name, path: file.path, sheet, sampleRows }, UPLOAD_WORKER_LIMITS.spreadsheetSeconds, 'file', 'file')
  if (!result.ok) throw refused(result.status, result.message, result.field)
  if (result.kind !== 'spreadsheet') throw new Error('upload worker answered the wrong task')
  return result.sheet
}

/** Checks a pond archive on disk in the upload worker: every record, reference and checksum. */
export async function checkArchiveInWorker(event: H3Event, path: string) {
  const result = await run(event, { kind: 'archive', path }, UPLOAD_WORKER_LIMITS.archiveSeconds, 'archive', 'archive')
  if (!result.ok) {
    throw refused(result.status, `The archive was refused: ${result.message}. Nothing was imported.`, result.field, result.problems)
  }
  if (result.kind !== 'archive') throw new Error('upload worker answered the wrong task')
  return result.manifest
}
