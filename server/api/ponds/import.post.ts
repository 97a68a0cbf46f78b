import { createWriteStream } from 'node:fs'
import { mkdir, rm } from 'node:fs/promises'
import { join } from 'node:path'
import { randomUUID } from 'node:crypto'
import { Transform } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { ARCHIVE_LIMITS } from '#shared/utils/archive-schema'
import { openArchive } from '../../workers/archive-read'
import { UploadRefusal } from '../../workers/zip-reader'

/** Receives a pond archive as the raw request body (application/zip) and creates a new pond from it. */
export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const declared = Number(getHeader(event, 'content-length') ?? 0)
  if (declared > ARCHIVE_LIMITS.archiveBytes) throw archiveRefused(`it is larger than ${ARCHIVE_LIMITS.archiveBytes} bytes`, 413)
  const dir = join(storageRoot(), 'tmp')
  await mkdir(dir, { recursive: true })
  const path = join(dir, `import-${randomUUID()}.zip`)
  let received = 0
  const limit = new Transform({
    transform(chunk: Buffer, _encoding, done) {
      received += chunk.length
      done(received > ARCHIVE_LIMITS.archiveBytes ? archiveRefused(`it is larger than ${ARCHIVE_LIMITS.archiveBytes} bytes`, 413) : null, chunk)
    },
  })
  try {
    await pipeline(event.node.req, limit, createWriteStream(path))
    if (received === 0) throw archiveRefused('the upload was empty')
    // The whole check runs in the upload worker; only an archive that passed it is opened here to be written.
    const manifest = await checkArchiveInWorker(event, path)
    const archive = await openArchive(path).catch((error) => {
      throw error instanceof UploadRefusal ? archiveRefused(error.message, error.status) : error
    })
    try {
      const pondId = await importArchive(archive, user.id)
      await recordAudit(event, { pondId, action: 'pond.imported', details: { name: manifest.pond.name, exportedAt: manifest.exportedAt, counts: manifest.counts } })
      setResponseStatus(event, 201)
      return { pondId, counts: manifest.counts }
    }
    finally {
      await archive.close()
    }
  }
  finally {
    await rm(path, { force: true })
  }
})
