import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { role, readOnly } = await requirePondRole(event, pondId)
  return waterTargetsView(await pondWaterTargets(pondId), role, readOnly)
})
