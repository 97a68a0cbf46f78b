import { PassThrough } from 'node:stream'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { archiveExportQuery } from '#shared/utils/archive-schema'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId, ['owner'])
  const { keepLocation } = await queryValidated(event, archiveExportQuery)
  const [pond] = (await usePool().query('select name from ponds where id = $1', [pondId])).rows
  await recordAudit(event, { pondId, action: 'pond.exported', details: { keepLocation } })
  const fileName = `${String(pond.name).replace(/[^\w.-]+/g, '-').replace(/^-|-$/g, '') || 'pond'}-${new Date().toISOString().slice(0, 10)}.zip`
  setResponseHeaders(event, {
    'content-type': 'application/zip',
    'content-disposition': `attachment; filename="${fileName}"`,
    'cache-control': 'no-store',
  })
  const body = new PassThrough()
  // The headers are gone by the time a photo could fail to read: the only honest answer left is to cut the download.
  writePondArchive(pondId, body, { keepLocation }).catch((error) => {
    console.error('[export] failed:', error)
    body.destroy(error)
  })
  return sendStream(event, body)
})
