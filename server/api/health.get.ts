/**
 * For outside checks: the database, the job queue's backlog and the storage folder.
 * 503 when the database or the storage cannot be used; a backlog alone is reported, not failed.
 */
export default defineEventHandler(async (event) => {
  const [db, queue, storage] = await Promise.all([
    usePool().query('select 1').then(() => 'up' as const, () => 'down' as const),
    queueBacklog().catch(() => ({ waiting: null, oldestSeconds: null })),
    storageWritable().then(writable => (writable ? 'ok' as const : 'not writable' as const)),
  ])
  const ok = db === 'up' && storage === 'ok'
  if (!ok) setResponseStatus(event, 503)
  return { ok, db, queue, storage }
})
