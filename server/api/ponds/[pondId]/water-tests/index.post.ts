import { eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { waterTestCreateSchema } from '#shared/utils/water-test-schemas'
import { MEASURED_WATER_PARAMETERS } from '#shared/utils/water-targets'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user } = await requirePondRole(event, pondId)
  const input = await readValidated(event, waterTestCreateSchema)

  const written = await useDb().transaction(async (tx) => {
    // A retried send after a lost answer: the test it already wrote is the answer.
    if (input.id) {
      const [existing] = await tx.select().from(schema.waterTests).where(eq(schema.waterTests.id, input.id))
      if (existing) {
        if (existing.pondId !== pondId || existing.testedById !== user.id) {
          throw createError({ statusCode: 409, statusMessage: 'Id in use', message: 'This water test id belongs to another test' })
        }
        return { row: existing, created: false }
      }
    }
    const readings = Object.fromEntries(MEASURED_WATER_PARAMETERS.map(p => [p, input[p] ?? null]))
    const [row] = await tx.insert(schema.waterTests).values({
      id: input.id, pondId, testedAt: new Date(input.testedAt), testedById: user.id, notes: input.notes, ...readings,
      visitId: await openVisitId(tx, pondId, user.id),
    }).onConflictDoNothing().returning()
    // Two retries racing: the other one wrote it first.
    if (!row) throw createError({ statusCode: 409, statusMessage: 'Id in use', message: 'This water test is being saved already; try again' })
    return { row, created: true }
  })

  setResponseStatus(event, written.created ? 201 : 200)
  return { waterTest: waterTestView(written.row, user.name, await pondWaterTargets(pondId)) }
})
