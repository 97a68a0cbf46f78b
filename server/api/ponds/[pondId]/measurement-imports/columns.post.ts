import { pondIdParams } from '#shared/utils/pond-schemas'
import { cellText, suggestMapping, suggestUnits, type SpreadsheetColumns } from '#shared/utils/measurement-import'

/** First step of an import: the sheet's columns and first rows, and a mapping to start from. Nothing is written. */
export default defineEventHandler(async (event): Promise<SpreadsheetColumns> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user } = await requirePondRole(event, pondId, IMPORT_ROLES)
  const { file, fields, remove } = await receiveImportForm(event)
  try {
    const sheet = await readSpreadsheet(event, file, fields.sheet || undefined, 8)
    const sample = sheet.rows.slice(0, 8)
    const suggested = suggestMapping(sheet.columns, sample.map(r => r.cells))
    return {
      fileName: sheet.fileName, format: sheet.format, sheets: sheet.sheets, sheet: sheet.sheet, columns: sheet.columns,
      rowCount: sheet.rowCount, blankLines: sheet.blankLines,
      sample: sample.map(r => ({ row: r.rowNumber, cells: Object.fromEntries(Object.entries(r.cells).map(([k, v]) => [k, cellText(v)])) })),
      suggested: { ...suggested, ...suggestUnits(suggested, user.units) },
    }
  }
  finally {
    await remove()
  }
})
