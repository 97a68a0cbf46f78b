// The upload worker: parses spreadsheets and checks pond archives on a thread of its own, so a large or
// hostile file costs this thread's time and memory (capped by the pool), never the server's event loop.
// Bundled on its own into .output/server/workers/upload-parser.mjs (see nuxt.config.ts).
import { checkArchive } from './archive-read'
import { readSpreadsheet } from './spreadsheet-read'
import { UploadRefusal } from './zip-reader'
import type { UploadTask, UploadTaskResult } from './upload-task'

export default async function parseUpload(task: UploadTask): Promise<UploadTaskResult> {
  try {
    if (task.kind === 'spreadsheet') {
      const sheet = await readSpreadsheet({ name: task.name, data: Buffer.from(task.data.buffer, task.data.byteOffset, task.data.byteLength) }, task.sheet, task.sampleRows)
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
