import { createWriteStream } from 'node:fs'
import { mkdir, rm } from 'node:fs/promises'
import { join } from 'node:path'
import { randomUUID } from 'node:crypto'
import { Transform } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { ARCHIVE_LIMITS } from '#shared/utils/archive-schema'

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
    const zip = await openZip(path)
    try {
      const archive = await validateArchive(zip)
      const pondId = await importArchive(zip, archive, user.id)
      await recordAudit(event, { pondId, action: 'pond.imported', details: { name: archive.manifest.pond.name, exportedAt: archive.manifest.exportedAt, counts: archive.manifest.counts } })
      setResponseStatus(event, 201)
      return { pondId, counts: archive.manifest.counts }
    }
    finally {
      zip.close()
    }
  }
  finally {
    await rm(path, { force: true })
  }
})
