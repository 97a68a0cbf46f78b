import { describe, it, expect } from 'vitest'
import {
  bathAmountMg,
  doseAmountMg,
  dilutionPlan,
  dilutionStockVolume,
  ANAESTHESIA_CAUTIONS,
  DOSE_CAUTIONS,
  injectionVolumeMl,
  saltForPondKg,
  saltGramsPerLitre,
} from '../../shared/utils/doses'
import { daysSince, DOSE_HELPER_CAUTIONS, roundForScale, roundForSyringe, saltToRaise, WEIGHT_STALE_DAYS } from '../../shared/utils/dose-helpers'

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
    { label: 'check whether local rules treat the fish as food-producing', pattern: /local rules treat the fish as food-producing/i },
  ])('includes: $label', ({ pattern }) => {
    expect(DOSE_CAUTIONS.some(text => pattern.test(text))).toBe(true)
  })

  it('names aeration, recovery water from the same source, and temperature and size for anaesthesia', () => {
    expect(ANAESTHESIA_CAUTIONS.join(' ')).toMatch(/aerat.*clean, well-aerated water from the same source/i)
    expect(ANAESTHESIA_CAUTIONS.join(' ')).toMatch(/temperature and the size of the fish/i)
  })

  it('cannot be changed by a caller', () => {
    expect(Object.isFrozen(DOSE_CAUTIONS)).toBe(true)
  })
})

describe('dose helpers: rounding to the measuring tool, salt after the last reading, weight age', () => {
  it.each([
    // Worked by hand: 10 mg/kg × 1.6 kg = 16 mg; 16 mg / 50 mg/mL = 0.32 mL → a 1 mL syringe (0.01 mL marks): 0.32 mL.
    { label: 'hand-checked: 10 mg/kg, 1.6 kg, 50 mg/mL', dose: 10, kg: 1.6, mgPerMl: 50, exact: 0.32, rounded: 0.32, step: 0.01 },
    // Worked by hand: 20 mg/kg × 4.2 kg = 84 mg; 84 / 50 = 1.68 mL → a 3 mL syringe (0.1 mL marks): 1.7 mL.
    { label: 'hand-checked: 20 mg/kg, 4.2 kg, 50 mg/mL', dose: 20, kg: 4.2, mgPerMl: 50, exact: 1.68, rounded: 1.7, step: 0.1 },
    // Worked by hand: 25 mg/kg × 9.1 kg = 227.5 mg; 227.5 / 40 = 5.6875 mL → a 10 mL syringe (0.2 mL marks): 5.6 mL.
    { label: 'hand-checked: 25 mg/kg, 9.1 kg, 40 mg/mL', dose: 25, kg: 9.1, mgPerMl: 40, exact: 5.6875, rounded: 5.6, step: 0.2 },
  ])('injection $label → $exact mL, drawn as $rounded mL', ({ dose, kg, mgPerMl, exact, rounded, step }) => {
    const ml = injectionVolumeMl(dose, kg, mgPerMl)!
    expect(ml).toBeCloseTo(exact, 9)
    expect(roundForSyringe(ml)).toMatchObject({ value: rounded, step })
  })

  it.each([
    // Worked by hand: 2 mg/L × 750 L = 1500 mg = 1.5 g → jeweller's scale (0.01 g): 1.50 g.
    { label: 'hand-checked: 2 mg/L in 750 L', mgL: 2, litres: 750, grams: 1.5, rounded: 1.5, step: 0.01 },
    // Worked by hand: 25 mg/L × 1,234 L = 30,850 mg = 30.85 g → 30.85 g.
    { label: 'hand-checked: 25 mg/L in 1,234 L', mgL: 25, litres: 1234, grams: 30.85, rounded: 30.85, step: 0.01 },
    // Worked by hand: 100 mg/L × 2,500 L = 250,000 mg = 250 g → kitchen scale (1 g): 250 g.
    { label: 'hand-checked: 100 mg/L in 2,500 L', mgL: 100, litres: 2500, grams: 250, rounded: 250, step: 1 },
  ])('bath $label → $grams g', ({ mgL, litres, grams, rounded, step }) => {
    const g = bathAmountMg(mgL, litres)! / 1000
    expect(g).toBeCloseTo(grams, 9)
    expect(roundForScale(g)).toMatchObject({ value: rounded, step })
  })

  it('salt: from the last reading up to the target (percent × 10 = g/L, REFERENCES.md)', () => {
    // Worked by hand: 0.3 % − 0.1 % = 0.2 % = 2 g/L; 2 g/L × 10,000 L = 20,000 g = 20 kg.
    expect(saltToRaise(0.3, 0.1, 10_000)).toEqual({ ok: true, addKg: expect.closeTo(20, 9), fromPercent: 0.1, toPercent: 0.3 })
    // No reading: from fresh water, 0.3 % of 10,000 L = 30 kg (same as saltForPondKg).
    expect(saltToRaise(0.3, null, 10_000)).toMatchObject({ ok: true, addKg: saltForPondKg(0.3, 10_000) })
    // Worked by hand: 20 kg = 20,000 g → platform scale (0.1 kg): 20,000 g.
    expect(roundForScale(20_000)).toMatchObject({ value: 20_000, step: 100 })
    expect(saltToRaise(0.3, 0.3, 10_000)).toMatchObject({ ok: false, message: expect.stringMatching(/add no salt/) })
    expect(saltToRaise(0.3, 0.5, 10_000).ok).toBe(false)
    expect(saltToRaise(5, 0, 10_000).ok).toBe(false)
    expect(saltToRaise(0.3, 0, 0).ok).toBe(false)
  })

  it('impossible amounts are refused: nothing to round', () => {
    expect(roundForSyringe(0)).toBeNull()
    expect(roundForSyringe(Number.NaN)).toBeNull()
    expect(roundForScale(-5)).toBeNull()
  })

  it('weight age: 90 days is still fresh, 91 is stale', () => {
    const now = new Date('2026-12-02T10:00:00Z')
    expect(daysSince('2026-09-03T10:00:00Z', now)).toBe(90)
    expect(daysSince('2026-09-02T09:00:00Z', now)).toBe(91)
    expect(WEIGHT_STALE_DAYS).toBe(90)
  })

  it('the helper cautions cover the veterinarian, the formulary and label, local rules, aeration and filters', () => {
    const all = DOSE_HELPER_CAUTIONS.join(' ')
    for (const words of [/licensed veterinarian/, /formulary/, /label/, /local rules/, /[Aa]erate/, /UV/]) expect(all).toMatch(words)
  })
})
