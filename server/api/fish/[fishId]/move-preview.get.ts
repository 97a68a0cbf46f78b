import { eq } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'
import { fishMovePreviewQuery, type FishMovePreview } from '#shared/utils/custody-schemas'

/** Who would lose sight of the fish, and which companions it would leave, if it moved to this pond. */
export default defineEventHandler(async (event): Promise<FishMovePreview> => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish } = await requireFishRole(event, fishId, ['owner'])
  const { toPondId } = await queryValidated(event, fishMovePreviewQuery)
  if (toPondId === fish.pondId) {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'The fish already lives in this pond', data: { fieldErrors: { toPondId: ['The fish already lives in this pond'] } } })
  }
  await requirePondRole(event, toPondId, ['owner'])
  const db = useDb()
  const [[toPond], losingSight, companions] = await Promise.all([
    db.select({ id: schema.ponds.id, name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, toPondId)),
    membersLosingSight(db, fish.pondId, toPondId),
    companionsLeftBehind(db, fish),
  ])
  return { toPond: toPond!, losingSight, companions }
})
