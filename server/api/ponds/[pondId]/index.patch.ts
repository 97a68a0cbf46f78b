import { eq } from 'drizzle-orm'
import { pondIdParams, pondUpdateSchema } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { role } = await requirePondRole(event, pondId, ['owner'])
  const input = await readValidated(event, pondUpdateSchema)
  // A volume typed as a number replaces a measured one: the old readings no longer explain it.
  const measurement = input.volumeLitres !== undefined ? { volumeMeasurement: null } : {}
  await useDb().update(schema.ponds).set({ ...input, ...measurement, updatedAt: new Date() }).where(eq(schema.ponds.id, pondId))
  return pondDetail(pondId, role)
})
