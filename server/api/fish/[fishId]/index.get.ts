import { fishIdParams } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish, role, readOnly, pondName } = await requireFishRole(event, fishId)
  return toFishProfile(fish, role, pondName, readOnly)
})
