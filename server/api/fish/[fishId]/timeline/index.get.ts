import { fishIdParams } from '#shared/utils/fish-schemas'
import { timelineQuerySchema } from '#shared/utils/timeline-schemas'
import type { TimelinePage } from '#shared/types/timeline'
import { timelinePageSql, type TimelineRow } from '../../../../db/queries/timeline'

export default defineEventHandler(async (event): Promise<TimelinePage> => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { user, role, fish } = await requireFishRole(event, fishId)
  const query = await queryValidated(event, timelineQuerySchema)
  const statement = timelinePageSql(fishId, { kinds: query.kind, cursor: decodeCursor(query.before), limit: query.limit })
  if (!statement) return { entries: [], nextCursor: null }
  const { rows } = await useDb().execute<TimelineRow>(statement)
  const page = rows.slice(0, query.limit)
  const context = { species: fish.species, userId: user.id, role }
  return {
    entries: page.map(row => rowToView(row, context)),
    nextCursor: rows.length > query.limit ? encodeCursor(page.at(-1)!) : null,
  }
})
