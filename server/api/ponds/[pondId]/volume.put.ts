import { eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { measuredVolumeLitres, pondVolumeUpdateSchema } from '#shared/utils/pond-volume-schemas'

// Anyone who cares for the pond may measure it (owner, keeper, vet); the litres are worked out here from the readings.
export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { role, readOnly } = await requirePondRole(event, pondId)
  const { measurement } = await readValidated(event, pondVolumeUpdateSchema)
  const litres = measuredVolumeLitres(measurement)
  if (litres === null || litres > 100_000_000) {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'These readings give no volume', data: { fieldErrors: { measurement: ['These readings give no volume a pond could hold'] } } })
  }
  await useDb().update(schema.ponds)
    .set({ volumeLitres: Math.round(litres * 10) / 10, volumeMeasurement: measurement, updatedAt: new Date() })
    .where(eq(schema.ponds.id, pondId))
  return pondDetail(pondId, role, readOnly)
})
