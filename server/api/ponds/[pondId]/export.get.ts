import { PassThrough } from 'node:stream'
import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId, ['owner'])
  const [pond] = (await usePool().query('select name from ponds where id = $1', [pondId])).rows
  await recordAudit(event, { pondId, action: 'pond.exported' })
  const fileName = `${String(pond.name).replace(/[^\w.-]+/g, '-').replace(/^-|-$/g, '') || 'pond'}-${new Date().toISOString().slice(0, 10)}.zip`
  setResponseHeaders(event, {
    'content-type': 'application/zip',
    'content-disposition': `attachment; filename="${fileName}"`,
    'cache-control': 'no-store',
  })
  const body = new PassThrough()
  writePondArchive(pondId, body).catch((error) => {
    console.error('[export] failed:', error)
    body.destroy(error)
  })
  return sendStream(event, body)
})
