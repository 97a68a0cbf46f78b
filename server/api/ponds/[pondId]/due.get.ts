import { pondIdParams } from '#shared/utils/pond-schemas'

/** Everything due at one pond, however far ahead: the next health check, the next water test, each open recheck. */
export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  return { items: await dueDetails({ pondId }, serverNow(event), null) }
})
