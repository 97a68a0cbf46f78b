import { describe, it, expect } from 'vitest'
import {
  caCO3ToKh,
  khToCaCO3,
  nh3NToNh3,
  nh3ToNh3N,
  no2NToNo2,
  no2ToNo2N,
  no3NToNo3,
  no3ToNo3N,
  unionizedAmmonia,
  unionizedAmmoniaFraction,
} from '../../shared/utils/water'

describe('unionizedAmmoniaFraction (Emerson et al. 1975)', () => {
  it.each([
    // Source: UF IFAS fact sheet FA16 "Ammonia in Aquatic Systems", table: 20 °C, pH 7.0 → 0.0039.
    { label: 'IFAS FA16 table: 20 °C pH 7.0', tempC: 20, pH: 7.0, expected: 0.0039, digits: 4 },
    // Source: IFAS FA16 worked example: 24 °C, pH 8.0 → 0.0502.
    { label: 'IFAS FA16 worked example: 24 °C pH 8.0', tempC: 24, pH: 8.0, expected: 0.0502, digits: 4 },
    // Derived: T = 298.15 K; pKa = 0.09018 + 2729.92/298.15 = 0.09018 + 9.15619 = 9.24637;
    // 10^(9.24637 − 7.5) = 10^1.74637 = 55.768; fraction = 1/56.768 = 0.017616.
    { label: 'derived: 25 °C pH 7.5', tempC: 25, pH: 7.5, expected: 0.017616, digits: 5 },
    // Derived: T = 283.15 K; pKa = 0.09018 + 9.64125 = 9.73143; 10^(9.73143 − 9) = 10^0.73143 = 5.3887;
    // fraction = 1/6.3887 = 0.15653.
    { label: 'derived: 10 °C pH 9.0', tempC: 10, pH: 9.0, expected: 0.15653, digits: 4 },
    // Derived: at pH = pKa half the ammonia is un-ionized (10^0 + 1 = 2).
    { label: 'derived: pH equal to pKa at 20 °C (9.40254)', tempC: 20, pH: 0.09018 + 2729.92 / 293.15, expected: 0.5, digits: 10 },
  ])('$label → $expected', ({ tempC, pH, expected, digits }) => {
    expect(unionizedAmmoniaFraction(tempC, pH)).toBeCloseTo(expected, digits)
  })

  it('property: the fraction rises with pH and with temperature', () => {
    expect(unionizedAmmoniaFraction(20, 8)!).toBeGreaterThan(unionizedAmmoniaFraction(20, 7)!)
    expect(unionizedAmmoniaFraction(28, 7.5)!).toBeGreaterThan(unionizedAmmoniaFraction(12, 7.5)!)
  })

  it.each([
    [Number.NaN, 7], [20, Number.NaN], [20, -0.5], [20, 14.5], [-300, 7],
  ])('invalid input (%s °C, pH %s) → null', (tempC, pH) => {
    expect(unionizedAmmoniaFraction(tempC, pH)).toBeNull()
  })
})

describe('unionizedAmmonia', () => {
  it('IFAS FA16 worked example: TAN 1.0 mg/L at 24 °C pH 8.0 → 0.0502 mg/L NH3', () => {
    expect(unionizedAmmonia(1.0, 24, 8.0)).toBeCloseTo(0.0502, 4)
  })

  it('derived: TAN 2.5 mg/L at 20 °C pH 7.0 → 2.5 × 0.0039422 = 0.009856 mg/L', () => {
    expect(unionizedAmmonia(2.5, 20, 7.0)).toBeCloseTo(0.009856, 5)
  })

  it('a zero test is zero; a negative reading is refused', () => {
    expect(unionizedAmmonia(0, 20, 7)).toBe(0)
    expect(unionizedAmmonia(-1, 20, 7)).toBeNull()
    expect(unionizedAmmonia(1, 20, 15)).toBeNull()
  })
})

describe('as-N conversions and KH (molar masses, docs/references.md)', () => {
  it.each([
    // Source: docs/references.md — NH3/NH3-N = 17.031/14.007 = 1.215892.
    { label: 'NH3-N → NH3: 1 mg/L → 1.215892', fn: nh3NToNh3, value: 1, expected: 1.215892 },
    { label: 'NH3 → NH3-N: 1 mg/L → 0.822441 (14.007/17.031)', fn: nh3ToNh3N, value: 1, expected: 0.822441 },
    // Source: docs/references.md — NO2⁻/NO2-N = 3.2844.
    { label: 'NO2-N → NO2: 0.5 mg/L → 1.6422', fn: no2NToNo2, value: 0.5, expected: 1.6422 },
    { label: 'NO2 → NO2-N: 3.2844 mg/L → 1', fn: no2ToNo2N, value: 3.2844, expected: 1 },
    // Source: docs/references.md — NO3⁻/NO3-N = 4.4266.
    { label: 'NO3-N → NO3: 10 mg/L → 44.266', fn: no3NToNo3, value: 10, expected: 44.266 },
    { label: 'NO3 → NO3-N: 44.266 mg/L → 10', fn: no3ToNo3N, value: 44.266, expected: 10 },
    // Source: docs/references.md — 1 dKH = 17.848 mg/L as CaCO3; derived: 4 dKH = 71.392.
    { label: 'KH: 1 dKH → 17.848 mg/L CaCO3', fn: khToCaCO3, value: 1, expected: 17.848 },
    { label: 'derived KH: 4 dKH → 71.392 mg/L CaCO3', fn: khToCaCO3, value: 4, expected: 71.392 },
    { label: 'derived KH: 89.24 mg/L CaCO3 → 5 dKH', fn: caCO3ToKh, value: 89.24, expected: 5 },
  ])('$label', ({ fn, value, expected }) => {
    expect(fn(value)).toBeCloseTo(expected, 5)
  })

  it.each([
    [nh3NToNh3, nh3ToNh3N], [no2NToNo2, no2ToNo2N], [no3NToNo3, no3ToNo3N], [khToCaCO3, caCO3ToKh],
  ])('property: %o and its inverse return the value', (forward, back) => {
    for (const value of [0, 0.25, 3, 80]) expect(back(forward(value)!)).toBeCloseTo(value, 12)
  })

  it('negative or non-finite readings → null', () => {
    expect(nh3NToNh3(-0.1)).toBeNull()
    expect(no3ToNo3N(Number.NaN)).toBeNull()
    expect(khToCaCO3(Number.POSITIVE_INFINITY)).toBeNull()
  })
})
