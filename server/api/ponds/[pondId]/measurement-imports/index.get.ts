import { desc, eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import type { MeasurementImportSummary } from '#shared/utils/measurement-import'

export default defineEventHandler(async (event): Promise<MeasurementImportSummary[]> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId, IMPORT_ROLES)
  const rows = await useDb().select({ record: schema.measurementImports, importedBy: schema.users.name })
    .from(schema.measurementImports)
    .innerJoin(schema.users, eq(schema.users.id, schema.measurementImports.importedById))
    .where(eq(schema.measurementImports.pondId, pondId))
    .orderBy(desc(schema.measurementImports.createdAt))
    .limit(100)
  return rows.map(({ record: r, importedBy }) => ({
    id: r.id, fileName: r.fileName, importedBy, rowCount: r.rowCount, importedCount: r.importedCount,
    problemCount: r.problemCount, skippedCount: r.skippedCount, createdAt: r.createdAt.toISOString(),
  }))
})
