// The upload worker: parses spreadsheets and checks pond archives on a thread of its own, so a large or
// hostile file costs this thread's time and memory (capped by the pool), never the server's event loop.
// Bundled on its own into .output/server/workers/upload-parser.mjs (see nuxt.config.ts).
import { readFileSync, readlinkSync } from 'node:fs'
import { setPriority } from 'node:os'
import { checkArchive } from './archive-read'
import { readSpreadsheet } from './spreadsheet-read'
import { UploadRefusal } from './zip-reader'
import type { UploadTask, UploadTaskResult } from './upload-task'

// How much less this thread weighs for the kernel than the server's own (nice 0): parsing may take longer,
// but on a busy machine the event loop still gets a core when a request arrives.
const UPLOAD_THREAD_NICE = 10

/** Lowers this thread alone: on Linux a thread is a task with its own nice value, named in /proc/thread-self. */
function lowerThreadPriority() {
  try {
    const threadId = Number(readlinkSync('/proc/thread-self').split('/').pop())
    if (Number.isInteger(threadId) && threadId > 0) setPriority(threadId, UPLOAD_THREAD_NICE)
  }
  catch {
    // Not Linux, or no /proc: the thread keeps the process's priority.
  }
}
lowerThreadPriority()

export default async function parseUpload(task: UploadTask): Promise<UploadTaskResult> {
  try {
    if (task.kind === 'spreadsheet') {
      // Read here, on this thread, in one call: the server's event loop and thread pool never carry the bytes.
      const sheet = await readSpreadsheet({ name: task.name, data: readFileSync(task.path) }, task.sheet, task.sampleRows)
      return { ok: true, kind: 'spreadsheet', sheet }
    }
    const { manifest } = await checkArchive(task.path)
    return { ok: true, kind: 'archive', manifest }
  }
  catch (error) {
    if (error instanceof UploadRefusal) return { ok: false, status: error.status, message: error.message, field: error.field, problems: error.problems }
    throw error
  }
}
