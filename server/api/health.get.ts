export default defineEventHandler(async (event) => {
  try {
    await usePool().query('select 1')
    return { ok: true, db: 'up' }
  }
  catch {
    setResponseStatus(event, 503)
    return { ok: false, db: 'down' }
  }
})
