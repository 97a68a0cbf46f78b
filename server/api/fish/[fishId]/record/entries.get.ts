import { fishIdParams } from '#shared/utils/fish-schemas'
import { recordPageQuerySchema } from '#shared/utils/record-schemas'
import type { TimelineRow } from '../../../../db/queries/timeline'
import { recordPageSql } from '../../../../db/queries/record'

/** One page of the health record, oldest first, of the entries written up to the record's `asOf`. */
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { user, role, fish } = await requireFishRole(event, fishId)
  const query = await queryValidated(event, recordPageQuerySchema)
  const cursor = decodeCursor(query.after, 'after')
  const { rows } = await useDb().execute<TimelineRow>(recordPageSql(fishId, { asOf: query.asOf, cursor, limit: query.limit }))
  const page = rows.slice(0, query.limit)
  const context = { species: fish.species, userId: user.id, role }
  return {
    entries: page.map(row => rowToView(row, context)),
    nextCursor: rows.length > query.limit ? encodeCursor(page.at(-1)!) : null,
  }
})
