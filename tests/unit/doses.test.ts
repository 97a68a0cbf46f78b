import { describe, it, expect } from 'vitest'
import {
  bathAmountMg,
  doseAmountMg,
  dilutionPlan,
  dilutionStockVolume,
  DOSE_CAUTIONS,
  injectionVolumeMl,
  saltForPondKg,
  saltGramsPerLitre,
} from '../../shared/utils/doses'

// Source for every formula: docs/references.md "Treatment arithmetic". The numbers below are arithmetic
// checks, not dose recommendations.

describe('bath, salt and injection arithmetic', () => {
  it.each([
    // Derived: mass = concentration × volume = 10 mg/L × 1000 L = 10,000 mg.
    { label: 'derived: 10 mg/L in 1000 L', concentrationMgL: 10, volumeL: 1000, expected: 10000 },
    // Derived: 0.5 mg/L × 12,000 L = 6,000 mg.
    { label: 'derived: 0.5 mg/L in 12,000 L', concentrationMgL: 0.5, volumeL: 12000, expected: 6000 },
  ])('bathAmountMg: $label → $expected mg', ({ concentrationMgL, volumeL, expected }) => {
    expect(bathAmountMg(concentrationMgL, volumeL)).toBeCloseTo(expected, 9)
  })

  it.each([
    // Source: docs/references.md — 0.3 % = 3 g/L.
    { label: 'docs/references.md: 0.3 %', percent: 0.3, expected: 3 },
    // Derived: percent × 10 → 0.1 % = 1 g/L, 3 % = 30 g/L.
    { label: 'derived: 0.1 %', percent: 0.1, expected: 1 },
    { label: 'derived: 3 %', percent: 3, expected: 30 },
  ])('saltGramsPerLitre: $label → $expected g/L', ({ percent, expected }) => {
    expect(saltGramsPerLitre(percent)).toBeCloseTo(expected, 12)
  })

  it.each([
    // Derived: 0.3 % → 3 g/L × 10,000 L = 30,000 g = 30 kg.
    { label: 'derived: 0.3 % in 10,000 L', percent: 0.3, volumeL: 10000, expected: 30 },
    // Derived: 0.1 % → 1 g/L × 2,500 L = 2.5 kg.
    { label: 'derived: 0.1 % in 2,500 L', percent: 0.1, volumeL: 2500, expected: 2.5 },
  ])('saltForPondKg: $label → $expected kg', ({ percent, volumeL, expected }) => {
    expect(saltForPondKg(percent, volumeL)).toBeCloseTo(expected, 9)
  })

  it.each([
    // Derived: volume = 25 mg/kg × 2 kg / 100 mg/mL = 50 mg / 100 mg/mL = 0.5 mL.
    { label: 'derived: 25 mg/kg, 2 kg, 100 mg/mL', dose: 25, weightKg: 2, concentration: 100, expected: 0.5 },
    // Derived: 10 mg/kg × 0.35 kg / 50 mg/mL = 3.5 mg / 50 = 0.07 mL.
    { label: 'derived: 10 mg/kg, 0.35 kg, 50 mg/mL', dose: 10, weightKg: 0.35, concentration: 50, expected: 0.07 },
  ])('injectionVolumeMl: $label → $expected mL', ({ dose, weightKg, concentration, expected }) => {
    expect(injectionVolumeMl(dose, weightKg, concentration)).toBeCloseTo(expected, 9)
  })

  it('derived: doseAmountMg 25 mg/kg × 2 kg = 50 mg', () => {
    expect(doseAmountMg(25, 2)).toBe(50)
  })

  it.each([
    ['bathAmountMg(0, 1000)', () => bathAmountMg(0, 1000)],
    ['bathAmountMg(10, -1)', () => bathAmountMg(10, -1)],
    ['saltGramsPerLitre(NaN)', () => saltGramsPerLitre(Number.NaN)],
    ['saltForPondKg(0.3, 0)', () => saltForPondKg(0.3, 0)],
    ['injectionVolumeMl(25, 2, 0)', () => injectionVolumeMl(25, 2, 0)],
    ['injectionVolumeMl(25, -2, 100)', () => injectionVolumeMl(25, -2, 100)],
    ['doseAmountMg(Infinity, 2)', () => doseAmountMg(Number.POSITIVE_INFINITY, 2)],
  ])('invalid input: %s → null', (_label, call) => {
    expect(call()).toBeNull()
  })
})

describe('dilution conventions', () => {
  it('convention "final" (default): stock counted in the final volume, C1·V1 = C2·V2', () => {
    // Derived: 100 mg/mL stock to 1 mg/mL in 100 mL final → V1 = 1 × 100 / 100 = 1 mL stock + 99 mL water.
    expect(dilutionPlan(100, 1, 100)).toEqual({ convention: 'final', stockVolume: 1, waterVolume: 99, finalVolume: 100 })
    expect(dilutionStockVolume(100, 1, 100, { convention: 'final' })).toBe(1)
  })

  it('convention "water": stock added to the stated water volume, C1·Vs = C2·(Vw + Vs)', () => {
    // Derived: Vs = C2·Vw / (C1 − C2) = 1 × 100 / 99 = 1.010101 mL; final 101.010101 mL.
    const plan = dilutionPlan(100, 1, 100, { convention: 'water' })!
    expect(plan.convention).toBe('water')
    expect(plan.stockVolume).toBeCloseTo(1.010101, 6)
    expect(plan.waterVolume).toBe(100)
    expect(plan.finalVolume).toBeCloseTo(101.010101, 6)
  })

  it.each(['final', 'water'] as const)('property (%s): the mixed concentration equals the target', (convention) => {
    for (const [stock, target, volume] of [[100, 1, 100], [50, 12.5, 8], [1000, 0.2, 20000]] as const) {
      const plan = dilutionPlan(stock, target, volume, { convention })!
      expect((stock * plan.stockVolume) / plan.finalVolume).toBeCloseTo(target, 9)
      expect(plan.stockVolume + plan.waterVolume).toBeCloseTo(plan.finalVolume, 9)
    }
  })

  it('the two conventions differ, which is why the choice is explicit', () => {
    expect(dilutionStockVolume(10, 5, 100, { convention: 'final' })).toBe(50)
    expect(dilutionStockVolume(10, 5, 100, { convention: 'water' })).toBe(100)
  })

  it.each([
    { label: 'target equal to stock', stock: 10, target: 10, volume: 100 },
    { label: 'target above stock', stock: 10, target: 20, volume: 100 },
    { label: 'zero volume', stock: 10, target: 1, volume: 0 },
    { label: 'NaN stock', stock: Number.NaN, target: 1, volume: 100 },
  ])('null for $label', ({ stock, target, volume }) => {
    expect(dilutionPlan(stock, target, volume)).toBeNull()
    expect(dilutionStockVolume(stock, target, volume, { convention: 'water' })).toBeNull()
  })
})

describe('DOSE_CAUTIONS', () => {
  it.each([
    // Source: docs/references.md "Treatment arithmetic" (MS-222 buffering and handling, 21-day withdrawal);
    // the licensed-veterinarian, formulary and local-code lines are common practice for dose helpers.
    { label: 'licensed veterinarian', pattern: /licensed veterinarian/i },
    { label: 'current formulary', pattern: /current formulary/i },
    { label: 'local codes', pattern: /local .*codes/i },
    { label: 'MS-222 buffered with sodium bicarbonate', pattern: /MS-222.*sodium bicarbonate/i },
    { label: 'MS-222 handling (gloves, mask, goggles)', pattern: /MS-222.*gloves.*mask.*goggles/i },
    { label: 'food-fish withdrawal 21 days', pattern: /withdrawal.*21 days/i },
  ])('includes: $label', ({ pattern }) => {
    expect(DOSE_CAUTIONS.some(text => pattern.test(text))).toBe(true)
  })

  it('cannot be changed by a caller', () => {
    expect(Object.isFrozen(DOSE_CAUTIONS)).toBe(true)
  })
})
