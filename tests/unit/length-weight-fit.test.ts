import { describe, expect, it } from 'vitest'
import { EXPECTED_B_RANGE, fitLatestPerFish, isUnusualB } from '../../shared/utils/condition'

// Published common-carp length–weight parameters (total length, cm, g): a = 0.0163, b = 2.935
// (Yılmaz & Cerim 2022, Acta Natura et Scientia 3(2):126-136; docs/references.md). Points on that curve
// give back the same a and b exactly; the expected range of b is Froese 2006 (J. Appl. Ichthyol. 22:241-253).
const carp = (lengthCm: number) => 0.0163 * lengthCm ** 2.935
const onCurve = (lengthCm: number, at: string) => ({ lengthCm, weightG: carp(lengthCm), at })

describe('the pond fit uses one point per fish, its latest weighing', () => {
  it('recovers the published a and b from each fish\'s latest point', () => {
    const fit = fitLatestPerFish([
      { points: [onCurve(30, '2026-05-01')] },
      { points: [onCurve(40, '2026-05-01')] },
      { points: [onCurve(55, '2026-05-01')] },
    ])!
    expect(fit.n).toBe(3)
    expect(fit.b).toBeCloseTo(2.935, 9)
    expect(fit.a).toBeCloseTo(0.0163, 9)
    expect(fit.bOutsideRange).toBe(false)
  })

  it('is not pulled by a fish weighed many times: earlier weighings are left out', () => {
    // One fish with ten old weighings off the curve (a heavy summer) and its latest on it: pooled,
    // those ten would dominate; with one point per fish the fit is the published curve again.
    const often = Array.from({ length: 10 }, (_, i) => ({ lengthCm: 20 + i, weightG: carp(20 + i) * 1.6, at: `2024-0${(i % 9) + 1}-01` }))
    const fit = fitLatestPerFish([
      { points: [...often, onCurve(30, '2026-05-01')] },
      { points: [onCurve(40, '2025-05-01'), onCurve(42, '2026-05-01')] },
      { points: [onCurve(55, '2026-04-01')] },
    ])!
    expect(fit.n).toBe(3)
    expect(fit.b).toBeCloseTo(2.935, 9)
  })

  it('needs three fish, not three weighings of one fish', () => {
    expect(fitLatestPerFish([{ points: [onCurve(30, '2025-01-01'), onCurve(35, '2025-06-01'), onCurve(40, '2026-01-01')] }])).toBeNull()
  })
})

describe('b outside 2.5–3.5 is flagged (Froese 2006)', () => {
  it.each([
    [2.5, false], [3.5, false], [2.935, false], [2.49, true], [3.51, true], [Number.NaN, true],
  ])('b = %d → flagged %s', (b, flagged) => {
    expect(isUnusualB(b)).toBe(flagged)
  })

  it('flags a fit whose points follow W = 0.05 · L² (b = 2, e.g. lengths typed in inches for some fish)', () => {
    const fit = fitLatestPerFish([20, 30, 45].map(l => ({ points: [{ lengthCm: l, weightG: 0.05 * l ** 2, at: '2026-01-01' }] })))!
    expect(fit.b).toBeCloseTo(2, 9)
    expect(fit.bOutsideRange).toBe(true)
    expect(EXPECTED_B_RANGE).toEqual({ low: 2.5, high: 3.5 })
  })
})
