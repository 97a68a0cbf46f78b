import { existsSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import Piscina from 'piscina'
import { perProcessShare } from './process-share'
import type { Spreadsheet } from '../workers/spreadsheet-read'
import type { UploadTask, UploadTaskResult } from '../workers/upload-task'

// Spreadsheets and archives are parsed on at most two threads (the machine's cores), each capped in
// memory; more uploads wait in a short queue and beyond it are told to try again.
export const UPLOAD_WORKER_LIMITS = {
  threads: 2,
  queue: 16,
  heapMb: 160,
  spreadsheetSeconds: 60,
  archiveSeconds: 15 * 60,
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
    maxThreads: perProcessShare(UPLOAD_WORKER_LIMITS.threads),
    maxQueue: UPLOAD_WORKER_LIMITS.queue,
    idleTimeout: 30_000,
    resourceLimits: { maxOldGenerationSizeMb: UPLOAD_WORKER_LIMITS.heapMb, maxYoungGenerationSizeMb: 16, stackSizeMb: 4 },
  })
  return pool
}

function refused(status: number, message: string, field: string, problems: unknown[] = []) {
  return createError({
    statusCode: status,
    statusMessage: status === 413 ? 'Too large' : status === 503 ? 'Busy' : 'Invalid input',
    message,
    data: { fieldErrors: { [field]: [message] }, ...(problems.length ? { problems } : {}) },
  })
}

async function run(task: UploadTask, seconds: number, field: string, what: string): Promise<UploadTaskResult> {
  try {
    return await uploadPool().run(task, { signal: AbortSignal.timeout(seconds * 1000) }) as UploadTaskResult
  }
  catch (error) {
    const { code, name, message } = error as { code?: string, name?: string, message?: string }
    if (code === 'ERR_WORKER_OUT_OF_MEMORY') throw refused(413, `The ${what} needs more memory to read than one upload may use (${UPLOAD_WORKER_LIMITS.heapMb} MB)`, field)
    if (name === 'AbortError' || name === 'TimeoutError') throw refused(413, `The ${what} took longer than ${seconds} seconds to read`, field)
    if (/queue is at limit/i.test(message ?? '')) throw refused(503, 'Too many files are being read right now: try again in a minute', field)
    throw error
  }
}

/** A spreadsheet as columns and rows, read in the upload worker; refusals become 4xx answers. */
export async function parseSpreadsheet(file: { name: string, data: Buffer }, sheet?: string, sampleRows?: number): Promise<Spreadsheet> {
  const result = await run({ kind: 'spreadsheet', name: file.name, data: new Uint8Array(file.data), sheet, sampleRows }, UPLOAD_WORKER_LIMITS.spreadsheetSeconds, 'file', 'file')
  if (!result.ok) throw refused(result.status, result.message, result.field)
  if (result.kind !== 'spreadsheet') throw new Error('upload worker answered the wrong task')
  return result.sheet
}

/** Checks a pond archive on disk in the upload worker: every record, reference and checksum. */
export async function checkArchiveInWorker(path: string) {
  const result = await run({ kind: 'archive', path }, UPLOAD_WORKER_LIMITS.archiveSeconds, 'archive', 'archive')
  if (!result.ok) {
    throw refused(result.status, `The archive was refused: ${result.message}. Nothing was imported.`, result.field, result.problems)
  }
  if (result.kind !== 'archive') throw new Error('upload worker answered the wrong task')
  return result.manifest
}
