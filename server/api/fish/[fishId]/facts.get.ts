import { fishIdParams } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId)
  return standingFactsOf(fishId)
})
