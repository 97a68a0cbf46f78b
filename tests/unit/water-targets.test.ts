import { describe, it, expect } from 'vitest'
import {
  ammoniaAcuteCriterionTanMgL,
  ammoniaChronicCriterionTanMgL,
  caCO3ToGh,
  celsiusToFahrenheit,
  fahrenheitToCelsius,
  ghToCaCO3,
  salinityPercentToPpt,
  salinityPptToPercent,
} from '../../shared/utils/water'
import { flagOf, targetFor, unionizedAmmoniaOf, waterFlags, WATER_PARAMETER_INFO } from '../../shared/utils/water-targets'
import { unusualReadings, waterTestCreateSchema } from '../../shared/utils/water-test-schemas'

describe('US EPA 2013 freshwater ammonia criteria (EPA-822-R-13-001)', () => {
  it('the headline values: chronic 1.9 and acute 17 mg TAN/L at pH 7 and 20 °C', () => {
    // Source: EPA 2013 criteria announcement (Federal Register 78:52192, 22 Aug 2013) — acute 17 mg TAN/L,
    // chronic 1.9 mg TAN/L, both at pH 7 and 20 °C. The formula's coefficients are recalled from the document.
    expect(ammoniaChronicCriterionTanMgL(7, 20)).toBeCloseTo(1.9, 1)
    expect(ammoniaAcuteCriterionTanMgL(7, 20)).toBeCloseTo(17, 0)
  })

  it('derived from the formula: chronic at pH 8.0 and 24 °C', () => {
    // pH term: 0.0278/(1+10^(7.688−8)) + 1.1994/(1+10^(8−7.688)) = 0.0278/1.48753 + 1.1994/3.05116 = 0.018689 + 0.393097 = 0.411786;
    // temperature term: 2.126 · 10^(0.028 · (20 − 24)) = 2.126 · 0.772681 = 1.642720; 0.8876 · 0.411786 · 1.642720 = 0.600415.
    expect(ammoniaChronicCriterionTanMgL(8, 24)).toBeCloseTo(0.6004, 3)
  })

  it('property: the criteria fall as pH rises; the chronic one is flat below 7 °C', () => {
    expect(ammoniaChronicCriterionTanMgL(8.5, 20)!).toBeLessThan(ammoniaChronicCriterionTanMgL(7, 20)!)
    expect(ammoniaChronicCriterionTanMgL(7.5, 2)).toBeCloseTo(ammoniaChronicCriterionTanMgL(7.5, 7)!, 12)
    expect(ammoniaAcuteCriterionTanMgL(7.5, 30)!).toBeLessThan(ammoniaAcuteCriterionTanMgL(7.5, 10)!)
  })

  it('nonsense input → null', () => {
    expect(ammoniaChronicCriterionTanMgL(15, 20)).toBeNull()
    expect(ammoniaAcuteCriterionTanMgL(7, Number.NaN)).toBeNull()
  })
})

describe('test-kit unit conversions', () => {
  it.each([
    // NIST SP 811: °C = (°F − 32) / 1.8 — 32 °F = 0 °C, 212 °F = 100 °C, 77 °F = 25 °C.
    { label: 'NIST SP 811: 32 °F → 0 °C', actual: () => fahrenheitToCelsius(32), expected: 0 },
    { label: 'NIST SP 811: 212 °F → 100 °C', actual: () => fahrenheitToCelsius(212), expected: 100 },
    { label: 'derived: 77 °F → 25 °C', actual: () => fahrenheitToCelsius(77), expected: 25 },
    { label: 'derived: 20 °C → 68 °F', actual: () => celsiusToFahrenheit(20), expected: 68 },
    // Salinity: 1 % = 10 g per 1000 = 10 ppt (docs/references.md: 0.3 % = 3 g/L).
    { label: 'docs/references.md: 0.3 % → 3 ppt', actual: () => salinityPercentToPpt(0.3), expected: 3 },
    { label: 'derived: 5 ppt → 0.5 %', actual: () => salinityPptToPercent(5), expected: 0.5 },
    // docs/references.md: 1 degree (dKH or dGH) = 17.848 mg/L as CaCO3.
    { label: 'docs/references.md: 8 dGH → 142.784 mg/L CaCO3', actual: () => ghToCaCO3(8), expected: 142.784 },
    { label: 'derived: 178.48 mg/L CaCO3 → 10 dGH', actual: () => caCO3ToGh(178.48), expected: 10 },
  ])('$label', ({ actual, expected }) => {
    expect(actual()).toBeCloseTo(expected, 9)
  })
})

describe('flags against target ranges', () => {
  it.each([
    { value: 6.4, target: { low: 6.5, high: 9 }, expected: 'low' },
    { value: 6.5, target: { low: 6.5, high: 9 }, expected: 'ok' },
    { value: 9, target: { low: 6.5, high: 9 }, expected: 'ok' },
    { value: 9.1, target: { low: 6.5, high: 9 }, expected: 'high' },
    { value: 0, target: { low: null, high: 0.1 }, expected: 'ok' },
  ] as const)('$value in $target → $expected', ({ value, target, expected }) => {
    expect(flagOf(value, target)).toBe(expected)
  })

  it('defaults name a published source or say common practice', () => {
    for (const info of Object.values(WATER_PARAMETER_INFO)) {
      expect(info.source).toMatch(/Southern Regional Aquaculture Center|EPA|Emerson|[Cc]ommon practice/)
    }
  })

  it('SRAC 464 ranges: pH 6.5–9.0; alkalinity 75–200 mg/L as CaCO3 = 4.2–11.2 dKH', () => {
    expect(targetFor('pH', {})).toMatchObject({ low: 6.5, high: 9 })
    // 75 / 17.848 = 4.202; 200 / 17.848 = 11.206.
    expect(targetFor('khDKH', {})).toMatchObject({ low: 4.2, high: 11.2 })
  })

  it('TAN is checked against the EPA chronic criterion at the test’s own pH and temperature', () => {
    expect(targetFor('tanMgL', {}, { pH: 7, temperatureC: 20 }).high).toBeCloseTo(1.887, 3)
    expect(targetFor('tanMgL', {}, { pH: 7 }).high).toBeNull()
    expect(waterFlags({ tanMgL: 1.5, pH: 7, temperatureC: 20 }).tanMgL).toBe('ok')
    expect(waterFlags({ tanMgL: 1.5, pH: 8, temperatureC: 24 }).tanMgL).toBe('high')
    expect(waterFlags({ tanMgL: 1.5 }).tanMgL).toBeUndefined()
    expect(waterFlags({ tanMgL: 1.5 }, { tanMgL: { low: null, high: 0.5 } }).tanMgL).toBe('high')
  })

  it('NH3-N is computed and flagged: IFAS FA16 worked example TAN 1.0, 24 °C, pH 8.0 → 0.0502', () => {
    expect(unionizedAmmoniaOf({ tanMgL: 1, temperatureC: 24, pH: 8 })).toBeCloseTo(0.0502, 4)
    expect(waterFlags({ tanMgL: 1, temperatureC: 24, pH: 8 }).unionizedAmmoniaNMgL).toBe('high')
    // IFAS FA16 table: 20 °C, pH 7.0 → fraction 0.0039; TAN 1.0 → 0.0039 mg/L, under 0.02.
    expect(waterFlags({ tanMgL: 1, temperatureC: 20, pH: 7 }).unionizedAmmoniaNMgL).toBe('ok')
  })
})

describe('water test input', () => {
  const at = new Date(Date.now() - 3_600_000).toISOString()
  it('accepts a partial test and refuses impossible values', () => {
    expect(waterTestCreateSchema.safeParse({ testedAt: at, pH: 7.5 }).success).toBe(true)
    expect(waterTestCreateSchema.safeParse({ testedAt: at, pH: 15 }).success).toBe(false)
    expect(waterTestCreateSchema.safeParse({ testedAt: at, temperatureC: 45.5 }).success).toBe(false)
    expect(waterTestCreateSchema.safeParse({ testedAt: at, nitrateNMgL: -3 }).success).toBe(false)
    expect(waterTestCreateSchema.safeParse({ testedAt: at }).success).toBe(false)
  })

  it('warns about possible but unusual readings', () => {
    expect(unusualReadings({ pH: 4.5, dissolvedOxygenMgL: 8 })).toEqual({ pH: expect.any(String) })
    expect(unusualReadings({ pH: 7.5, temperatureC: 22 })).toEqual({})
  })
})
