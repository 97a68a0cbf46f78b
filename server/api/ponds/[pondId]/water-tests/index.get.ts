import { desc, eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { waterTestListQuery } from '#shared/utils/water-test-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  const { limit } = await queryValidated(event, waterTestListQuery)
  const rows = await useDb().select({ test: schema.waterTests, testedByName: schema.users.name })
    .from(schema.waterTests)
    .innerJoin(schema.users, eq(schema.users.id, schema.waterTests.testedById))
    .where(eq(schema.waterTests.pondId, pondId))
    .orderBy(desc(schema.waterTests.testedAt), desc(schema.waterTests.id))
    .limit(limit)
  const targets = await pondWaterTargets(pondId)
  return { waterTests: rows.map(r => waterTestView(r.test, r.testedByName, targets)) }
})
