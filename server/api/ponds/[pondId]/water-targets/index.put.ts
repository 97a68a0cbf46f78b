import { eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { pondWaterTargetsSchema } from '#shared/utils/water-test-schemas'
import { WATER_TARGET_EDITORS, type PondWaterTargets } from '#shared/utils/water-targets'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { role } = await requirePondRole(event, pondId, WATER_TARGET_EDITORS)
  const { targets } = await readValidated(event, pondWaterTargetsSchema)
  // A parameter sent as null goes back to its published default.
  const merged = { ...await pondWaterTargets(pondId), ...targets }
  const next = Object.fromEntries(Object.entries(merged).filter(([, target]) => target)) as PondWaterTargets
  await useDb().update(schema.ponds).set({ waterTargets: next, updatedAt: new Date() }).where(eq(schema.ponds.id, pondId))
  return waterTargetsView(next, role, false)
})
