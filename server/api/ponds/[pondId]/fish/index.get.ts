import { pondIdParams } from '#shared/utils/pond-schemas'
import { fishListQuerySchema } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  const query = await queryValidated(event, fishListQuerySchema)
  return listFish(pondId, query)
})
