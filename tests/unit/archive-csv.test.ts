import { describe, expect, it } from 'vitest'
import { csvCell, dataValueAt, fileSlug, kindColumns, spreadsheetTime } from '../../shared/utils/archive-csv'
import { ENTRY_DATA_SCHEMAS } from '../../shared/utils/timeline-schemas'

describe('archive CSV cells', () => {
  // ISO 8601 with a space for the "T" is the date-time form spreadsheets recognise on entry (common practice).
  it.each([
    ['2025-06-02T18:00:00.000Z', '2025-06-02 18:00:00'],
    ['2025-06-02T20:00:00+02:00', '2025-06-02 18:00:00'],
    ['2025-06-02', '2025-06-02'],
    ['Ulcer on the left flank', 'Ulcer on the left flank'],
  ])('%s becomes %s', (value, cell) => {
    expect(spreadsheetTime(value)).toBe(cell)
  })

  it('keeps numbers and booleans, and writes lists and objects in words', () => {
    expect(csvCell(-12.5)).toBe(-12.5)
    expect(csvCell(true)).toBe(true)
    expect(csvCell(['lethargy', 'clamped_fins'])).toBe('lethargy; clamped_fins')
    expect(csvCell([{ system: 'skin', state: 'abnormal', note: 'Ulcer' }, { system: 'gills', state: 'normal', note: '' }]))
      .toBe('system: skin, state: abnormal, note: Ulcer; system: gills, state: normal')
    expect(csvCell(null)).toBeNull()
  })

  it('reads dotted paths and makes file names', () => {
    expect(dataValueAt({ entered: { weight: '2 lb 3 oz' } }, 'entered.weight')).toBe('2 lb 3 oz')
    expect(dataValueAt({ entered: null }, 'entered.weight')).toBeUndefined()
    expect(fileSlug('lab_result')).toBe('lab-result')
  })
})

describe('columns of an entry kind, read from its schema', () => {
  it('flattens nested objects and sends lists of items to files of their own', () => {
    const measurement = kindColumns(ENTRY_DATA_SCHEMAS.measurement)
    expect(measurement.columns).toEqual(expect.arrayContaining(['weightG', 'lengthCm', 'lengthType', 'entered.weight', 'entered.length', 'note']))
    const lab = kindColumns(ENTRY_DATA_SCHEMAS.lab_result)
    expect(lab.lists).toEqual(expect.arrayContaining([{ field: 'analytes', columns: ['name', 'value', 'unit', 'low', 'high'] }, { field: 'organisms', columns: ['name', 'count'] }]))
    expect(kindColumns(ENTRY_DATA_SCHEMAS.exam).lists).toEqual([{ field: 'findings', columns: ['system', 'state', 'note'] }])
  })
})
