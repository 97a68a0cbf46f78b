import { describe, it, expect } from 'vitest'
import {
  convert,
  formatLength,
  formatMass,
  formatTemperature,
  formatVolume,
  unitQuantity,
} from '../../shared/utils/units'

describe('convert: exact NIST factors', () => {
  it.each([
    // Source: NIST SP 811 / Handbook 44 (docs/references.md) — each factor is exact by definition.
    { label: 'NIST: 1 lb = 0.45359237 kg', value: 1, from: 'lb', to: 'kg', expected: 0.45359237 },
    { label: 'NIST: 1 oz = 28.349523125 g', value: 1, from: 'oz', to: 'g', expected: 28.349523125 },
    { label: 'NIST: 1 in = 2.54 cm', value: 1, from: 'in', to: 'cm', expected: 2.54 },
    { label: 'NIST: 1 ft = 0.3048 m', value: 1, from: 'ft', to: 'm', expected: 0.3048 },
    { label: 'NIST: 1 US gal = 3.785411784 L', value: 1, from: 'US gal', to: 'L', expected: 3.785411784 },
    { label: 'NIST: 1 imp gal = 4.54609 L', value: 1, from: 'imp gal', to: 'L', expected: 4.54609 },
    { label: 'NIST: °C = (°F − 32)/1.8, 212 °F = 100 °C', value: 212, from: '°F', to: '°C', expected: 100 },
    { label: 'NIST: 32 °F = 0 °C', value: 32, from: 'F', to: 'C', expected: 0 },
    // Derived: (−40 − 32)/1.8 = −40, the point where the scales meet.
    { label: 'derived: −40 °F = −40 °C', value: -40, from: '°F', to: '°C', expected: -40 },
    // Derived: 20·1.8 + 32 = 68.
    { label: 'derived: 20 °C = 68 °F', value: 20, from: '°C', to: '°F', expected: 68 },
    // Derived: 453.59237 / 28.349523125 = 16 exactly.
    { label: 'derived: 1 lb = 16 oz', value: 1, from: 'lb', to: 'oz', expected: 16 },
    // Derived: 304.8 mm / 25.4 mm = 12.
    { label: 'derived: 1 ft = 12 in', value: 1, from: 'ft', to: 'in', expected: 12 },
    // Derived: 1000 L / 3.785411784 = 264.172052 US gal.
    { label: 'derived: 1000 L = 264.172052 US gal', value: 1000, from: 'L', to: 'gal', expected: 264.172052 },
    // Derived: 4.54609 / 3.785411784 = 1.200950 US gal per imperial gallon.
    { label: 'derived: 1 imp gal = 1.200950 US gal', value: 1, from: 'imp gal', to: 'US gal', expected: 1.20095 },
    { label: 'derived: 1250 g = 1.25 kg', value: 1250, from: 'g', to: 'kg', expected: 1.25 },
    { label: 'derived: 400 mm = 40 cm', value: 400, from: 'mm', to: 'cm', expected: 40 },
    { label: 'alias: 2 l = 2 L', value: 2, from: 'l', to: 'L', expected: 2 },
  ])('$label', ({ value, from, to, expected }) => {
    expect(convert(value, from, to)).toBeCloseTo(expected, 6)
  })

  it.each([
    ['g', 'kg'], ['kg', 'lb'], ['lb', 'oz'], ['oz', 'g'],
    ['mm', 'in'], ['cm', 'ft'], ['in', 'm'], ['ft', 'mm'],
    ['L', 'US gal'], ['imp gal', 'gal'], ['l', 'imp gal'],
    ['°C', '°F'], ['F', 'C'], ['°F', 'K'],
  ])('property: %s → %s → back returns the value', (from, to) => {
    for (const value of [0, 1, 37.5, 12000, -3.2]) {
      expect(convert(convert(value, from, to), to, from)).toBeCloseTo(value, 9)
    }
  })

  it.each([
    { from: 'kg', to: 'cm', message: /Cannot convert mass \(kg\) to length \(cm\)/ },
    { from: 'L', to: '°C', message: /Cannot convert volume/ },
    { from: 'stone', to: 'kg', message: /Unknown unit "stone"/ },
    { from: 'g', to: 'furlong', message: /Unknown unit "furlong"/ },
  ])('throws a clear error for $from → $to', ({ from, to, message }) => {
    expect(() => convert(1, from, to)).toThrow(message)
  })

  it('knows which quantity a unit measures', () => {
    expect(unitQuantity('US gal')).toBe('volume')
    expect(unitQuantity('°F')).toBe('temperature')
    expect(unitQuantity('oz')).toBe('mass')
    expect(unitQuantity('in')).toBe('length')
    expect(unitQuantity('parsec')).toBeNull()
  })
})

describe('formatting for the two unit systems', () => {
  it.each([
    { label: 'derived: 1250 g = 1.25 kg', grams: 1250, system: 'metric', expected: '1.25 kg' },
    // Derived: 1250 / 28.349523125 = 44.0925 oz = 2 lb 12.09 oz.
    { label: 'derived: 1250 g = 2 lb 12.1 oz', grams: 1250, system: 'us', expected: '2 lb 12.1 oz' },
    { label: 'derived: 850 g', grams: 850, system: 'metric', expected: '850 g' },
    { label: 'derived: 4.5 g keeps a decimal', grams: 4.5, system: 'metric', expected: '4.5 g' },
    // Common practice: a weight is shown in the unit its rounded figure belongs to. 999.6 g rounds to 1000 g,
    // so it reads as kilograms like 1000 g does, not as "1,000 g".
    { label: 'common practice: 999.6 g reads 1.00 kg', grams: 999.6, system: 'metric', expected: '1.00 kg' },
    { label: 'common practice: 999.4 g stays in grams', grams: 999.4, system: 'metric', expected: '999 g' },
    // Likewise 9.96 g rounds to 10.0 g and is shown without the decimal, like 10 g.
    { label: 'common practice: 9.96 g reads 10 g', grams: 9.96, system: 'metric', expected: '10 g' },
    // Derived: 340 / 28.349523125 = 11.993 oz, under a pound.
    { label: 'derived: 340 g = 12.0 oz', grams: 340, system: 'us', expected: '12.0 oz' },
    // Derived: 453.5 g = 15.997 oz, which rounds to 16.0 oz and carries to 1 lb.
    { label: 'derived: 453.5 g rounds up to 1 lb 0.0 oz', grams: 453.5, system: 'us', expected: '1 lb 0.0 oz' },
  ] as const)('formatMass: $label', ({ grams, system, expected }) => {
    expect(formatMass(grams, system)).toBe(expected)
  })

  it.each([
    { label: '40 cm', centimetres: 40, system: 'metric', expected: '40.0 cm' },
    // Derived: 40 / 2.54 = 15.748 in.
    { label: 'derived: 40 cm = 15.7 in', centimetres: 40, system: 'us', expected: '15.7 in' },
  ] as const)('formatLength: $label', ({ centimetres, system, expected }) => {
    expect(formatLength(centimetres, system)).toBe(expected)
  })

  it.each([
    { label: '12,000 L', litres: 12000, system: 'metric', expected: '12,000 L' },
    // Derived: 12000 / 3.785411784 = 3170.06 US gal.
    { label: 'derived: 12,000 L = 3,170 US gal', litres: 12000, system: 'us', expected: '3,170 US gal' },
    // Derived: 50 / 3.785411784 = 13.21 US gal; small volumes keep a decimal.
    { label: 'derived: 50 L = 13.2 US gal', litres: 50, system: 'us', expected: '13.2 US gal' },
  ] as const)('formatVolume: $label', ({ litres, system, expected }) => {
    expect(formatVolume(litres, system)).toBe(expected)
  })

  it.each([
    { label: '20 °C', celsius: 20, system: 'metric', expected: '20.0 °C' },
    { label: 'derived: 20 °C = 68.0 °F', celsius: 20, system: 'us', expected: '68.0 °F' },
    { label: 'derived: −2.5 °C = 27.5 °F', celsius: -2.5, system: 'us', expected: '27.5 °F' },
  ] as const)('formatTemperature: $label', ({ celsius, system, expected }) => {
    expect(formatTemperature(celsius, system)).toBe(expected)
  })

  it('shows a dash instead of a number that is not there', () => {
    expect(formatMass(Number.NaN, 'metric')).toBe('—')
    expect(formatLength(-1, 'us')).toBe('—')
    expect(formatVolume(Number.POSITIVE_INFINITY, 'metric')).toBe('—')
    expect(formatTemperature(Number.NaN, 'us')).toBe('—')
  })
})
