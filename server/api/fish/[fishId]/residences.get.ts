import { fishIdParams } from '#shared/utils/fish-schemas'

/** Where the fish has lived, oldest first, read from its move entries: the first pond from its arrival. */
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  return residencesOf(await requireFishRole(event, fishId))
})
