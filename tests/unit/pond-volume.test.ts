import { describe, it, expect } from 'vitest'
import {
  circlePondLitres,
  irregularPondLitres,
  ovalPondLitres,
  pondVolumeLitres,
  rectanglePondLitres,
} from '../../shared/utils/pond-volume'
import { litresTo, measuredVolumeLitres, pondVolumeMeasurementSchema } from '../../shared/utils/pond-volume-schemas'

// Source for the formulas: docs/references.md, common practice from extension services (e.g. Colorado
// State University Extension fact sheet 6.400). Values are computed by hand from them; 1 m³ = 1000 L.

describe('pond volume in litres', () => {
  it.each([
    // Derived: 4 × 3 × 1.2 = 14.4 m³ = 14,400 L.
    { label: 'derived: rectangle 4 × 3 × 1.2 m', actual: () => rectanglePondLitres(4, 3, 1.2), expected: 14400 },
    // Derived: π · 1.5² · 1 = 7.068583 m³ = 7,068.583 L (diameter 3 m).
    { label: 'derived: circle 3 m across, 1 m deep', actual: () => circlePondLitres(3, 1), expected: 7068.583 },
    // Derived: π/4 · 4 · 2 · 1 = 2π = 6.283185 m³ = 6,283.185 L.
    { label: 'derived: oval 4 × 2 m, 1 m deep', actual: () => ovalPondLitres(4, 2, 1), expected: 6283.185 },
    // Derived: averages 6 m, 3.5 m, 1.0 m → 21 m³ = 21,000 L.
    { label: 'derived: irregular, averaged readings', actual: () => irregularPondLitres([5, 6, 7], [3, 4], [0.8, 1.0, 1.2]), expected: 21000 },
    { label: 'derived: irregular, single readings 2 × 1.5 × 0.6', actual: () => irregularPondLitres(2, 1.5, 0.6), expected: 1800 },
  ])('$label → $expected L', ({ actual, expected }) => {
    expect(actual()).toBeCloseTo(expected, 3)
  })

  it('property: an oval with equal length and width is a circle of that diameter', () => {
    expect(ovalPondLitres(3.4, 3.4, 0.9)).toBeCloseTo(circlePondLitres(3.4, 0.9)!, 9)
  })

  it('property: a rectangle read once is the irregular shape with the same single readings', () => {
    expect(irregularPondLitres([4], [3], [1.2])).toBeCloseTo(rectanglePondLitres(4, 3, 1.2)!, 9)
  })

  it.each([
    { shape: 'rectangle', dims: { shape: 'rectangle', lengthM: 4, widthM: 3, depthM: 1.2 }, expected: 14400 },
    { shape: 'circle', dims: { shape: 'circle', diameterM: 3, depthM: 1 }, expected: 7068.583 },
    { shape: 'oval', dims: { shape: 'oval', lengthM: 4, widthM: 2, depthM: 1 }, expected: 6283.185 },
    { shape: 'irregular', dims: { shape: 'irregular', lengthsM: [5, 6, 7], widthsM: [3, 4], depthsM: [0.8, 1, 1.2] }, expected: 21000 },
  ] as const)('pondVolumeLitres dispatches $shape', ({ dims, expected }) => {
    expect(pondVolumeLitres(structuredClone(dims) as Parameters<typeof pondVolumeLitres>[0])).toBeCloseTo(expected, 3)
  })

  it.each([
    ['rectangle with zero depth', () => rectanglePondLitres(4, 3, 0)],
    ['circle with negative diameter', () => circlePondLitres(-3, 1)],
    ['oval with NaN width', () => ovalPondLitres(4, Number.NaN, 1)],
    ['irregular with no depth readings', () => irregularPondLitres([5], [3], [])],
    ['irregular with a negative reading', () => irregularPondLitres([5, -1], [3], [1])],
    ['unknown shape', () => pondVolumeLitres({ shape: 'triangle' } as unknown as Parameters<typeof pondVolumeLitres>[0])],
  ])('invalid input: %s → null', (_label, call) => {
    expect(call()).toBeNull()
  })
})

describe('pond volume from measurements in metres or feet, answered in litres or gallons', () => {
  it.each([
    // NIST SP 811: 1 ft = 0.3048 m, so 1 ft³ = 0.028316846592 m³ = 28.316846592 L.
    // Derived: 10 × 8 × 3 ft = 240 ft³ = 6,796.04318208 L.
    { label: 'NIST ft: rectangle 10 × 8 × 3 ft', m: { shape: 'rectangle', unit: 'ft', shownIn: 'L', length: 10, width: 8, depth: 3 }, litres: 6796.04318208 },
    // Derived: circle 12 ft across, 2.5 ft deep: π · 6² · 2.5 = 282.743339 ft³ × 28.316846592 = 8,006.39975 L.
    { label: 'NIST ft: circle 12 ft, 2.5 ft deep', m: { shape: 'circle', unit: 'ft', shownIn: 'L', diameter: 12, depth: 2.5 }, litres: 8006.39975 },
    // Derived: irregular in metres, averages 5, 3 and 0.9 m → 13.5 m³ = 13,500 L.
    { label: 'derived: irregular metres', m: { shape: 'irregular', unit: 'm', shownIn: 'L', lengths: [4.5, 5.5], widths: [3], depths: [0.6, 0.9, 1.2] }, litres: 13500 },
  ] as const)('$label → $litres L', ({ m, litres }) => {
    const parsed = pondVolumeMeasurementSchema.parse(m)
    expect(measuredVolumeLitres(parsed)).toBeCloseTo(litres, 3)
  })

  it.each([
    // NIST Handbook 44: 1 US gallon = 3.785411784 L exactly; 1 imperial gallon = 4.54609 L exactly.
    { label: 'NIST: 3.785411784 L = 1 US gal', litres: 3.785411784, unit: 'us gal', expected: 1 },
    { label: 'NIST: 4.54609 L = 1 imperial gal', litres: 4.54609, unit: 'imp gal', expected: 1 },
    // Derived: 6,796.04318208 L ÷ 3.785411784 = 1,795.325 US gal; ÷ 4.54609 = 1,494.9205 imperial gal.
    { label: 'derived: 240 ft³ in US gal', litres: 6796.04318208, unit: 'us gal', expected: 1795.3247 },
    { label: 'derived: 240 ft³ in imperial gal', litres: 6796.04318208, unit: 'imp gal', expected: 1494.9205 },
  ] as const)('$label', ({ litres, unit, expected }) => {
    expect(litresTo(litres, unit)).toBeCloseTo(expected, 3)
  })

  it('refuses readings that make no pond', () => {
    expect(pondVolumeMeasurementSchema.safeParse({ shape: 'circle', unit: 'm', diameter: -3, depth: 1 }).success).toBe(false)
    expect(pondVolumeMeasurementSchema.safeParse({ shape: 'irregular', unit: 'm', lengths: [], widths: [2], depths: [1] }).success).toBe(false)
    expect(pondVolumeMeasurementSchema.safeParse({ shape: 'rectangle', unit: 'yd', length: 2, width: 2, depth: 1 }).success).toBe(false)
  })
})
