import { describe, expect, it } from 'vitest'
import { indexFish, readAmount, readDate, readMeasurementRow, suggestMapping, suggestUnits, unitFromHeader, type ImportMapping } from '../../shared/utils/measurement-import'

// Unit factors: NIST SP 811 / Handbook 44, exact by definition — 1 lb = 453.59237 g, 1 oz = 28.349523125 g, 1 in = 2.54 cm.
const weight = (cell: string | number, extra: Partial<Parameters<typeof readAmount>[1]> = {}) =>
  readAmount(cell, { base: 'g', allowed: ['g', 'kg', 'lb', 'oz'], decimal: '.', ...extra })

describe('reading an amount from a spreadsheet cell', () => {
  it.each([
    ['1250', { fixedUnit: 'g' }, 1250, undefined], // no conversion
    ['2.5 kg', {}, 2500, '2.5 kg'], // 1 kg = 1000 g (SI)
    ['1 lb', {}, 453.59237, '1 lb'], // NIST SP 811
    ['2 lb 12 oz', {}, 2 * 453.59237 + 12 * 28.349523125, '2 lb 12 oz'], // NIST SP 811: 1247.3790175 g
    ['3 lbs', {}, 1360.77711, '3 lb'], // "lbs" is the same unit
    ['1,5', { decimal: ',' as const, fixedUnit: 'kg' }, 1500, '1,5 kg'], // decimal comma chosen
    ['1,250', { fixedUnit: 'g' }, 1250, undefined], // thousands grouped in threes with a point reader (parseDecimal table)
    ['1.250,5', { decimal: ',' as const, fixedUnit: 'g' }, 1250.5, undefined], // the same with a comma reader
    [1250.5, { fixedUnit: 'g' }, 1250.5, undefined], // a number cell needs no parsing
  ])('%s → %d g', (cell, extra, grams, entered) => {
    const result = weight(cell, extra)
    expect(result.ok).toBe(true)
    if (!result.ok) return
    expect(result.value).toBeCloseTo(grams, 6)
    expect('entered' in result ? result.entered : undefined).toBe(entered)
  })

  it.each([
    ['heavy', { fixedUnit: 'g' }, 'not_a_number'],
    ['1,25', { fixedUnit: 'g' }, 'not_a_number'], // a comma with "." chosen cannot be a thousands group: refused, not guessed (parseDecimal table)
    ['13 stone', {}, 'unknown_unit'],
    ['1250', {}, 'missing_unit'],
    ['2 kg', { unitCell: 'lb' }, 'unknown_unit'], // the cell and the unit column disagree
  ])('%s is refused as %s', (cell, extra, reason) => {
    const result = weight(cell, extra)
    expect(result).toMatchObject({ ok: false, reason })
  })

  it('reads lengths in inches and millimetres into centimetres', () => {
    expect(readAmount('10 in', { base: 'cm', allowed: ['cm', 'mm', 'm', 'in'], decimal: '.' })).toMatchObject({ ok: true, value: 25.4 }) // 1 in = 2.54 cm exactly
    expect(readAmount('392', { base: 'cm', allowed: ['cm', 'mm', 'm', 'in'], decimal: '.', fixedUnit: 'mm' })).toMatchObject({ ok: true, value: 39.2 })
  })
})

describe('reading a date in the chosen format', () => {
  it.each([
    ['2024-03-05', 'YYYY-MM-DD', '2024-03-05'],
    ['05/03/2024', 'DD/MM/YYYY', '2024-03-05'],
    ['03/05/2024', 'MM/DD/YYYY', '2024-03-05'],
    ['5.3.2024', 'DD/MM/YYYY', '2024-03-05'],
    ['29/02/2024', 'DD/MM/YYYY', '2024-02-29'], // 2024 is a leap year (Gregorian calendar: divisible by 4, not by 100)
  ] as const)('%s as %s is %s', (text, format, day) => {
    expect(readDate(text, format, '2026-01-01')).toEqual({ ok: true, date: day })
  })

  it.each([
    ['29/02/2023', 'DD/MM/YYYY'], // 2023 is not a leap year
    ['2024-03-05', 'DD/MM/YYYY'], // the wrong format is not tried instead
    ['13/13/2024', 'MM/DD/YYYY'],
    ['2027-01-01', 'YYYY-MM-DD'], // after "today"
    ['', 'YYYY-MM-DD'],
  ] as const)('%s as %s is refused', (text, format) => {
    expect(readDate(text, format, '2026-01-01').ok).toBe(false)
  })

  it('takes a spreadsheet date cell as it is', () => {
    expect(readDate(new Date(Date.UTC(2020, 0, 31)), 'MM/DD/YYYY', '2026-01-01')).toEqual({ ok: true, date: '2020-01-31' })
  })
})

describe('a whole row and the suggested mapping', () => {
  const index = indexFish([{ id: 'a', name: 'Hana', microchip: '999000000000001' }, { id: 'b', name: 'Sora', microchip: null }, { id: 'c', name: 'sora', microchip: null }])
  const mapping: ImportMapping = { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', dateFormat: 'YYYY-MM-DD', weightColumn: 'W', weightUnit: 'g', lengthType: 'total', decimalSeparator: '.' }

  it('reads a good row and refuses an ambiguous name and an implausible weight', () => {
    expect(readMeasurementRow({ Fish: ' hana ', Date: '2024-01-02', W: '900' }, mapping, index, '2026-01-01')).toEqual({ ok: true, value: { fishId: 'a', fishName: 'Hana', date: '2024-01-02', weightG: 900, lengthType: 'total' } })
    expect(readMeasurementRow({ Fish: 'Sora', Date: '2024-01-02', W: '900' }, mapping, index, '2026-01-01')).toMatchObject({ ok: false, reason: 'ambiguous_fish' })
    // The timeline's own limit: more than 60 kg is not a plausible koi (the largest on record weigh about 40 kg; common practice).
    expect(readMeasurementRow({ Fish: 'Hana', Date: '2024-01-02', W: '61000' }, mapping, index, '2026-01-01')).toMatchObject({ ok: false, reason: 'out_of_range' })
  })

  it('suggests columns by header and a date format only when the dates allow just one', () => {
    expect(suggestMapping(['Koi', 'Date', 'Weight (kg)'], [{ Date: '2024-01-31' }])).toEqual({ fishColumn: 'Koi', fishMatch: 'name', dateColumn: 'Date', weightColumn: 'Weight (kg)', dateFormat: 'YYYY-MM-DD' })
    expect(suggestMapping(['Koi', 'Date'], [{ Date: '01/02/2024' }]).dateFormat).toBeUndefined()
    expect(suggestMapping(['Koi', 'Date'], [{ Date: '31/01/2024' }]).dateFormat).toBe('DD/MM/YYYY')
  })

  it('says an over-limit weight in the importer\'s own units', () => {
    // 61 kg = 61000 g; 60 kg limit = 132 lb 4.4 oz (60000 / 28.349523125 = 2116.4 oz; NIST SP 811).
    const us = readMeasurementRow({ Fish: 'Hana', Date: '2024-01-02', W: '61000' }, mapping, index, '2026-01-01', { units: 'us', decimalMark: 'point' })
    expect(us).toMatchObject({ ok: false, reason: 'out_of_range' })
    if (!us.ok) expect(us.message).toContain('more than 132 lb 4.4 oz')
    const metric = readMeasurementRow({ Fish: 'Hana', Date: '2024-01-02', W: '61000' }, mapping, index, '2026-01-01', { units: 'metric', decimalMark: 'comma' })
    if (!metric.ok) expect(metric.message).toBe('61,00 kg is more than 60,00 kg: not a plausible weight for a pond fish. Check the unit.')
    expect(metric.ok).toBe(false)
  })
})

describe('units from the column headers and the importer\'s unit system', () => {
  it.each([
    ['Weight (g)', 'weight', 'g'], ['Weight (kg)', 'weight', 'kg'], ['weight kg', 'weight', 'kg'], ['Wt lbs', 'weight', 'lb'],
    ['Weight in g', 'weight', 'g'], ['oz', 'weight', 'oz'], ['Weight', 'weight', undefined],
    ['Length (cm)', 'length', 'cm'], ['Length in cm', 'length', 'cm'], ['TL (in)', 'length', 'in'], ['Length inches', 'length', 'in'],
    ['SL mm', 'length', 'mm'], ['Length', 'length', undefined],
  ] as const)('"%s" names the %s unit %s', (header, quantity, unit) => {
    expect(unitFromHeader(header, quantity)).toBe(unit)
  })

  it('falls back to the importer\'s units, and offers none where a unit column was found', () => {
    expect(suggestUnits({ weightColumn: 'Weight', lengthColumn: 'Length' }, 'us')).toEqual({ weightUnit: 'lb', lengthUnit: 'in' })
    expect(suggestUnits({ weightColumn: 'Weight', lengthColumn: 'Length' }, 'metric')).toEqual({ weightUnit: 'g', lengthUnit: 'cm' })
    expect(suggestUnits({ weightColumn: 'Weight (kg)', lengthColumn: 'TL (in)' }, 'metric')).toEqual({ weightUnit: 'kg', lengthUnit: 'in' })
    expect(suggestUnits({ weightColumn: 'Weight', weightUnitColumn: 'Unit' }, 'metric')).toEqual({})
  })
})
