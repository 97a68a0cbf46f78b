import { eq } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish, role, readOnly } = await requireFishRole(event, fishId)
  const [pond] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, fish.pondId))
  return toFishProfile(fish, role, pond!.name, readOnly)
})
