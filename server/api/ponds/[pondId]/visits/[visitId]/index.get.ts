import { visitIdParams } from '#shared/utils/visits'

/** The visit's summary: what the owner and keepers were mailed, to open later and print. */
export default defineEventHandler(async (event) => {
  const { pondId, visitId } = paramsValidated(event, visitIdParams, 'Visit not found')
  await requirePondRole(event, pondId)
  const visit = await visitOfPond(pondId, visitId)
  return { visit: await visitSummary(visit, serverNow(event)) }
})
