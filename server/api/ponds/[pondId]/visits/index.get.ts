import { pondIdParams } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  return visitsOfPond(pondId)
})
