import { describe, expect, it } from 'vitest'
import { CONDITION_RANGES, PLAUSIBILITY_THRESHOLDS, allAcknowledged, measurementWarnings } from '../../shared/utils/plausibility'

// K = 100 · W / L³ (Fulton 1904; Nash, Valencia & Geffen 2006, Fisheries 31(5):236-238), worked by hand
// in each row. The species ranges and the 5 % / 6 weeks and 30 % / 30 days thresholds are common practice.
const koi = { species: 'koi', hatchYear: 2015 }
const codes = (list: { code: string }[]) => list.map(w => w.code)

describe('condition factor outside the species range (common practice ranges)', () => {
  it.each([
    // 1000 g at 40 cm: K = 100 · 1000 / 64000 = 1.5625 (worked example in docs/references.md) → usual
    [1000, 40, []],
    // 1250 g typed, read as 1.25 g by a comma slip, at 40 cm: K = 0.00195 → far below 1.0
    [1.25, 40, ['condition_factor']],
    // 4000 g at 40 cm: K = 400000 / 64000 = 6.25 → above 2.5
    [4000, 40, ['condition_factor']],
  ] as const)('%d g at %d cm TL → %j', (weightG, lengthCm, expected) => {
    expect(codes(measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', weightG, lengthCm, lengthType: 'total' }, []))).toEqual(expected)
  })

  it('names the numbers and the range, and says where the range comes from', () => {
    const [warning] = measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', weightG: 4000, lengthCm: 40 }, [])
    expect(warning).toMatchObject({ code: 'condition_factor', low: CONDITION_RANGES.koi!.low, high: CONDITION_RANGES.koi!.high })
    expect(warning!.value).toBeCloseTo(6.25, 3)
    expect(warning!.message).toContain('4.00 kg')
    expect(warning!.message).toContain('40.0 cm')
    expect(warning!.message).toContain('6.25')
    expect(warning!.message).toContain('common practice')
  })

  it('does not judge K from standard length, nor species without a range', () => {
    expect(measurementWarnings(koi, { occurredAt: '2026-06-01', weightG: 4000, lengthCm: 40, lengthType: 'standard' }, [])).toEqual([])
    expect(measurementWarnings({ species: 'other', hatchYear: null }, { occurredAt: '2026-06-01', weightG: 4000, lengthCm: 40 }, [])).toEqual([])
  })

  it('writes the numbers in the reader\'s units and decimal mark', () => {
    const [warning] = measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', weightG: 4000, lengthCm: 40 }, [], { units: 'metric', decimalMark: 'comma' })
    expect(warning!.message).toContain('4,00 kg')
    expect(warning!.message).toContain('6,25')
  })
})

describe('an adult fish recorded shorter (more than 5 % within 6 weeks, common practice)', () => {
  const earlier = [{ occurredAt: '2026-05-01T12:00:00Z', lengthCm: 50, lengthType: 'total' as const }]
  it.each([
    // 47 cm after 50 cm: −6 % → warned
    [47, ['length_shrank']],
    // 48 cm after 50 cm: −4 % → within the measuring error
    [48, []],
    // exactly −5 % (47.5 cm) is not "more than 5 %"
    [47.5, []],
  ] as const)('%d cm after 50 cm → %j', (lengthCm, expected) => {
    expect(codes(measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', lengthCm, lengthType: 'total' }, earlier))).toEqual(expected)
  })

  it('leaves young fish and lengths older than six weeks alone', () => {
    expect(measurementWarnings({ species: 'koi', hatchYear: 2025 }, { occurredAt: '2026-06-01', lengthCm: 40 }, earlier)).toEqual([])
    const old = [{ occurredAt: '2026-04-01T12:00:00Z', lengthCm: 50 }] // 61 days before: outside 42
    expect(measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', lengthCm: 40 }, old)).toEqual([])
    expect(PLAUSIBILITY_THRESHOLDS.lengthWindowDays).toBe(42)
  })

  it('names both lengths and the earlier date', () => {
    const [warning] = measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', lengthCm: 45 }, earlier)
    expect(warning).toMatchObject({ code: 'length_shrank', value: 45, earlierValue: 50, earlierAt: '2026-05-01' })
    expect(warning!.message).toMatch(/45\.0 cm is 10 % shorter than the 50\.0 cm recorded on 2026-05-01/)
  })
})

describe('a weight more than 30 % away from a weighing within 30 days (common practice)', () => {
  const earlier = [
    { occurredAt: '2026-04-01T12:00:00Z', weightG: 500 },
    { occurredAt: '2026-05-20T12:00:00Z', weightG: 1000 },
  ]
  it.each([
    [1250, []], // +25 %
    [1310, ['weight_jump']], // +31 %
    [690, ['weight_jump']], // −31 %
    [700, []], // exactly −30 % is not more than 30 %
    [1.25, ['weight_jump']], // "1,25" read as 1.25 g instead of 1250 g: −99.9 %
  ] as const)('%d g after 1000 g 12 days earlier → %j', (weightG, expected) => {
    expect(codes(measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', weightG }, earlier))).toEqual(expected)
  })

  it('compares only with the last weighing, and only within 30 days', () => {
    const late = [{ occurredAt: '2026-04-20T12:00:00Z', weightG: 500 }] // 42 days before
    expect(measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', weightG: 1000 }, late)).toEqual([])
  })

  it('ignores measurements after the new one (a back-dated entry)', () => {
    const later = [{ occurredAt: '2026-06-10T12:00:00Z', weightG: 300 }]
    expect(measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', weightG: 1000 }, later)).toEqual([])
  })

  it('a warning passes only when its own code was acknowledged', () => {
    const warnings = measurementWarnings(koi, { occurredAt: '2026-06-01T12:00:00Z', weightG: 1310 }, earlier)
    expect(allAcknowledged(warnings, [])).toBe(false)
    expect(allAcknowledged(warnings, ['condition_factor'])).toBe(false)
    expect(allAcknowledged(warnings, ['weight_jump'])).toBe(true)
  })
})
