import { fishIdParams } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  return timelinePageOf(event, await requireFishRole(event, fishId))
})
