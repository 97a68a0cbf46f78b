import { fishIdParams } from '#shared/utils/fish-schemas'
import { timelineQuerySchema } from '#shared/utils/timeline-schemas'
import { timelinePageSql, type TimelineRow } from '../../../../db/queries/timeline'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { user, role, fish } = await requireFishRole(event, fishId)
  const query = await queryValidated(event, timelineQuerySchema)
  const statement = timelinePageSql(fishId, { kinds: query.kind, cursor: decodeCursor(query.before), limit: query.limit })
  const rows = statement ? (await useDb().execute<TimelineRow>(statement)).rows : []
  const page = rows.slice(0, query.limit)
  const context = { species: fish.species, userId: user.id, role }
  return {
    entries: page.map(row => rowToView(row, context)),
    nextCursor: rows.length > query.limit ? encodeCursor(page.at(-1)!) : null,
  }
})
