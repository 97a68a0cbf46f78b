import { pondIdParams } from '#shared/utils/pond-schemas'
import type { ImportReport } from '#shared/utils/measurement-import'

/** A dry run: the full report of what importing this file with this mapping would do. Nothing is written. */
export default defineEventHandler(async (event): Promise<ImportReport> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user } = await requirePondRole(event, pondId, IMPORT_ROLES)
  const { file, fields, remove } = await receiveImportForm(event)
  try {
    const sheet = await readSpreadsheet(event, file, parseMapping(fields.mapping).sheet)
    const mapping = parseMapping(fields.mapping, sheet.columns, user)
    const { report } = await planImport(useDb(), pondId, sheet, mapping, importOptions(user, fields))
    return { ...report, importId: null, dryRun: true, importedCount: 0 }
  }
  finally {
    await remove()
  }
})
