import { describe, expect, it } from 'vitest'
import { decimalMarkOfLocale, formatDecimal, parseDecimal, readDecimal } from '../../shared/utils/decimal'

// The table of the numbers issue: how a point-decimal and a comma-decimal reader write numbers
// (thousands grouped in threes, ISO 80000-1 § 7.3.1 for the space group; the rest common practice).
describe('parseDecimal', () => {
  it.each([
    ['1,250', 'point', 1250],
    ['12,000.5', 'point', 12000.5],
    ['1,25', 'point', null],
    ['0.5', 'point', 0.5],
    ['1,250,000.25', 'point', 1250000.25],
    ['12 000', 'point', 12000],
    ['-3.5', 'point', -3.5],
    ['1,2500', 'point', null],
    ['1.2.3', 'point', null],
    ['1e3', 'point', null],
    ['abc', 'point', null],
    ['', 'point', null],
    ['1,25', 'comma', 1.25],
    ['1.250,5', 'comma', 1250.5],
    ['1.25', 'comma', null],
    ['1.250', 'comma', 1250],
    ['0,5', 'comma', 0.5],
    ['12 kg', 'comma', null],
  ] as const)('%s read with a decimal %s is %s', (text, mark, expected) => {
    expect(parseDecimal(text, mark)).toBe(expected)
  })

  it('says how to write an ambiguous number', () => {
    const reading = readDecimal('1,25', 'point')
    expect(reading.ok).toBe(false)
    if (!reading.ok) expect(reading.message).toContain('1.25')
  })
})

// Written back the way the reader writes numbers, so what the form shows ("= 1,250 g") reads back the same.
describe('formatDecimal', () => {
  it.each([
    [1250, 'point', '1,250'],
    [1250, 'comma', '1.250'],
    [12000.5, 'point', '12,000.5'],
    [1250.5, 'comma', '1.250,5'],
    [0.5, 'comma', '0,5'],
    [-3.5, 'point', '-3.5'],
  ] as const)('%d with a decimal %s is "%s", and reads back', (value, mark, text) => {
    expect(formatDecimal(value, mark)).toBe(text)
    expect(parseDecimal(text, mark)).toBe(value)
  })

  // Unicode CLDR number symbols (as shipped with Node's ICU): German writes a decimal comma, US English a point.
  it.each([['de-DE', 'comma'], ['fr-FR', 'comma'], ['en-US', 'point'], ['en-GB', 'point'], [undefined, 'point']] as const)('the locale %s writes a decimal %s', (locale, mark) => {
    expect(decimalMarkOfLocale(locale)).toBe(mark)
  })
})
