import { pondIdParams } from '#shared/utils/pond-schemas'
import type { ImportReport } from '#shared/utils/measurement-import'

/** Imports the rows that read cleanly; the answer lists every row that did not, with its reason. */
export default defineEventHandler(async (event): Promise<ImportReport> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user } = await requirePondRole(event, pondId, IMPORT_ROLES)
  const { file, fields, remove } = await receiveImportForm(event)
  try {
    const sheet = await readSpreadsheet(event, file, parseMapping(fields.mapping).sheet)
    const mapping = parseMapping(fields.mapping, sheet.columns, user)
    const report = await runImport(event, pondId, user.id, sheet, mapping, file.sha256, importOptions(user, fields))
    setResponseStatus(event, 201)
    return report
  }
  finally {
    await remove()
  }
})
