import { describe, it, expect } from 'vitest'
import {
  fitLengthWeight,
  fultonK,
  hasStandardWeight,
  predictedWeight,
  relativeCondition,
  relativeWeight,
  specificGrowthRate,
  standardWeight,
  weightChangeAlert,
} from '../../shared/utils/condition'

describe('fultonK', () => {
  it.each([
    // Source: docs/references.md worked example (Fulton 1904; Nash et al. 2006): 1000 g at 40 cm → 1.5625.
    { label: 'docs/references.md: 1000 g at 40 cm', weightG: 1000, lengthCm: 40, expected: 1.5625 },
    // Derived from K = 100·W/L³: 100·2000/50³ = 200000/125000 = 1.6.
    { label: 'derived: 2000 g at 50 cm', weightG: 2000, lengthCm: 50, expected: 1.6 },
    // Derived: 100·500/30³ = 50000/27000 = 1.851851…
    { label: 'derived: 500 g at 30 cm', weightG: 500, lengthCm: 30, expected: 50000 / 27000 },
    // Derived: 100·12/10³ = 1.2 (a small goldfish).
    { label: 'derived: 12 g at 10 cm', weightG: 12, lengthCm: 10, expected: 1.2 },
  ])('$label → $expected', ({ weightG, lengthCm, expected }) => {
    expect(fultonK(weightG, lengthCm)).toBeCloseTo(expected, 10)
  })

  it.each([
    { weightG: 1000, lengthCm: 40 },
    { weightG: 350, lengthCm: 27.5 },
    { weightG: 4200, lengthCm: 63 },
  ])('property: K scales as W/L³, so doubling L divides K by 8 ($weightG g, $lengthCm cm)', ({ weightG, lengthCm }) => {
    const k = fultonK(weightG, lengthCm)!
    expect(fultonK(weightG, lengthCm * 2)).toBeCloseTo(k / 8, 12)
    expect(fultonK(weightG * 3, lengthCm)).toBeCloseTo(k * 3, 12)
  })

  it.each([
    [0, 40], [-5, 40], [1000, 0], [1000, -1], [Number.NaN, 40], [1000, Number.POSITIVE_INFINITY],
  ])('invalid input (%s g, %s cm) → null', (weightG, lengthCm) => {
    expect(fultonK(weightG, lengthCm)).toBeNull()
  })
})

describe('length–weight relationship and relative condition', () => {
  // Source: docs/references.md — common carp a = 0.0163, b = 2.935 (Yılmaz & Cerim 2022) → W(40 cm) ≈ 820.8 g.
  const carp = { a: 0.0163, b: 2.935 }

  it('docs/references.md: W(40 cm) ≈ 820.8 g for a = 0.0163, b = 2.935', () => {
    expect(predictedWeight(40, carp.a, carp.b)).toBeCloseTo(820.8, 1)
  })

  it.each([
    // Source: docs/references.md — a fish exactly on the curve has Kn = 1.
    { label: 'fish on the curve (820.79 g at 40 cm)', weightG: 820.793, expected: 1 },
    // Derived: Kn = W / (a·L^b) = 1000 / 820.793 = 1.21833.
    { label: 'derived: 1000 g at 40 cm', weightG: 1000, expected: 1.21833 },
    // Derived: 700 / 820.793 = 0.85283.
    { label: 'derived: 700 g at 40 cm', weightG: 700, expected: 0.85283 },
  ])('Kn (Le Cren 1951): $label → $expected', ({ weightG, expected }) => {
    expect(relativeCondition(weightG, 40, carp.a, carp.b)).toBeCloseTo(expected, 4)
  })

  it('relativeCondition rejects invalid input', () => {
    expect(relativeCondition(0, 40, carp.a, carp.b)).toBeNull()
    expect(relativeCondition(1000, 40, 0, carp.b)).toBeNull()
    expect(relativeCondition(1000, 40, carp.a, Number.NaN)).toBeNull()
  })

  it.each([
    { label: 'Yılmaz & Cerim 2022 carp parameters', a: 0.0163, b: 2.935 },
    { label: 'isometric growth (b = 3)', a: 0.015, b: 3 },
    { label: 'negative allometry (b = 2.6)', a: 0.05, b: 2.6 },
  ])('property: a fit of exact points from W = a·L^b recovers a and b ($label)', ({ a, b }) => {
    const points = [8, 12, 18, 25, 33, 41, 52, 64].map(lengthCm => ({ lengthCm, weightG: a * lengthCm ** b }))
    const fit = fitLengthWeight(points)!
    expect(fit.n).toBe(points.length)
    expect(fit.b).toBeCloseTo(b, 9)
    expect(fit.a / a).toBeCloseTo(1, 9)
    expect(fit.r2).toBeCloseTo(1, 12)
  })

  it('property: with ±3 % multiplicative noise the fit recovers a within 10 % and b within 0.05', () => {
    // A fixed linear congruential sequence keeps the noise the same on every run.
    let seed = 12345
    const nextUniform = () => {
      seed = (seed * 1103515245 + 12345) % 2 ** 31
      return seed / 2 ** 31
    }
    const points = Array.from({ length: 60 }, (_, i) => {
      const lengthCm = 10 + i
      const noise = 1 + (nextUniform() - 0.5) * 0.06
      return { lengthCm, weightG: carp.a * lengthCm ** carp.b * noise }
    })
    const fit = fitLengthWeight(points)!
    expect(Math.abs(fit.b - carp.b)).toBeLessThan(0.05)
    expect(Math.abs(fit.a / carp.a - 1)).toBeLessThan(0.1)
    expect(fit.r2).toBeGreaterThan(0.99)
    expect(fit.r2).toBeLessThan(1)
  })

  it('reports r² (the coefficient of determination), not Pearson r', () => {
    // Derived by hand in log10 space: x = 1, 2, 3 and y = 1, 3, 2 give Sxx = 2, Syy = 2, Sxy = 1, so
    // b = Sxy / Sxx = 0.5, Pearson r = Sxy / √(Sxx · Syy) = 0.5 and r² = 0.25. A fit reporting r would read 0.5.
    const fit = fitLengthWeight([
      { lengthCm: 10, weightG: 10 },
      { lengthCm: 100, weightG: 1000 },
      { lengthCm: 1000, weightG: 100 },
    ])!
    expect(fit.b).toBeCloseTo(0.5, 12)
    expect(fit.r2).toBeCloseTo(0.25, 12)
  })

  it('ignores points that are not finite and positive', () => {
    const good = [10, 20, 30, 40].map(lengthCm => ({ lengthCm, weightG: carp.a * lengthCm ** carp.b }))
    const fit = fitLengthWeight([
      ...good,
      { lengthCm: 0, weightG: 100 },
      { lengthCm: 25, weightG: -3 },
      { lengthCm: Number.NaN, weightG: 100 },
      { lengthCm: 30, weightG: Number.POSITIVE_INFINITY },
    ])!
    expect(fit.n).toBe(4)
    expect(fit.b).toBeCloseTo(carp.b, 9)
  })

  it.each([
    { label: 'no points', points: [] },
    { label: 'two usable points', points: [{ lengthCm: 10, weightG: 15 }, { lengthCm: 20, weightG: 120 }, { lengthCm: 0, weightG: 5 }] },
    { label: 'zero variance in length', points: [{ lengthCm: 30, weightG: 400 }, { lengthCm: 30, weightG: 420 }, { lengthCm: 30, weightG: 450 }] },
  ])('fitLengthWeight → null for $label', ({ points }) => {
    expect(fitLengthWeight(points)).toBeNull()
  })
})

describe('standard weight and relative weight (Bister et al. 2000, common carp)', () => {
  it.each([
    // Source: docs/references.md worked example — TL 400 mm → Ws ≈ 909.9 g.
    { label: 'docs/references.md: TL 400 mm', totalLengthMm: 400, expected: 909.9 },
    // Derived: log10 200 = 2.301030; ×2.920 = 6.719008; −4.639 → 2.080008; 10^2.080008 = 120.23 g.
    { label: 'derived: TL 200 mm (lower limit)', totalLengthMm: 200, expected: 120.23 },
    // Derived: log10 500 = 2.698970; ×2.920 = 7.880992; −4.639 → 3.241992; 10^3.241992 = 1745.79 g.
    { label: 'derived: TL 500 mm', totalLengthMm: 500, expected: 1745.79 },
  ])('Ws: $label → $expected g', ({ totalLengthMm, expected }) => {
    expect(standardWeight('koi', totalLengthMm)).toBeCloseTo(expected, 1)
  })

  it.each(['koi', 'Koi', 'common carp', 'Common  Carp', 'Cyprinus carpio', 'CYPRINUS CARPIO', ' cyprinus carpio '])(
    'accepts the species name %j', (species) => {
      expect(hasStandardWeight(species)).toBe(true)
      // Source: docs/references.md — 1000 g at TL 400 mm → Wr ≈ 109.9.
      expect(relativeWeight(species, 1000, 400)).toBeCloseTo(109.9, 1)
    })

  it.each(['goldfish', 'Carassius auratus', 'other', '', 'koi carp hybrid'])(
    'no equation is published for %j → null', (species) => {
      expect(hasStandardWeight(species)).toBe(false)
      expect(standardWeight(species, 400)).toBeNull()
      expect(relativeWeight(species, 1000, 400)).toBeNull()
    })

  it.each([
    { label: 'below the 200 mm lower limit', weightG: 100, totalLengthMm: 199 },
    { label: 'zero weight', weightG: 0, totalLengthMm: 400 },
    { label: 'NaN length', weightG: 1000, totalLengthMm: Number.NaN },
    { label: 'negative length', weightG: 1000, totalLengthMm: -400 },
  ])('Wr → null for $label', ({ weightG, totalLengthMm }) => {
    expect(relativeWeight('koi', weightG, totalLengthMm)).toBeNull()
  })

  it('derived: a fish at exactly Ws has Wr = 100', () => {
    expect(relativeWeight('koi', standardWeight('koi', 650)!, 650)).toBeCloseTo(100, 10)
  })
})

describe('specificGrowthRate (Hopkins 1992: 100·(ln W2 − ln W1)/days)', () => {
  it.each([
    // Derived: 100·(ln 200 − ln 100)/100 = ln 2 = 0.693147 % per day.
    { label: 'derived: doubling 100 → 200 g in 100 days', w1: 100, w2: 200, days: 100, expected: 0.693147 },
    // Derived: 100·ln(1.1)/365 = 100·0.0953102/365 = 0.0261124 % per day.
    { label: 'derived: +10 % in a year', w1: 1000, w2: 1100, days: 365, expected: 0.0261124 },
    // Derived: 100·ln(0.9)/30 = 100·(−0.1053605)/30 = −0.351202 % per day.
    { label: 'derived: −10 % in 30 days', w1: 1000, w2: 900, days: 30, expected: -0.351202 },
    { label: 'derived: no change', w1: 800, w2: 800, days: 30, expected: 0 },
  ])('$label → $expected', ({ w1, w2, days, expected }) => {
    expect(specificGrowthRate(w1, w2, days)).toBeCloseTo(expected, 5)
  })

  it.each([[0, 100, 10], [100, -1, 10], [100, 200, 0], [100, 200, -5], [Number.NaN, 200, 10]])(
    'invalid input (%s, %s, %s days) → null', (w1, w2, days) => {
      expect(specificGrowthRate(w1, w2, days)).toBeNull()
    })
})

// Alert thresholds (10 % in 90 days; no gain over a year; growing under 5 years) are common practice.
describe('weightChangeAlert (common practice thresholds)', () => {
  it('common practice: exactly 10 % lost in 60 days is flagged', () => {
    const alerts = weightChangeAlert([
      { date: '2024-01-01', weightG: 1000 },
      { date: '2024-03-01', weightG: 900 },
    ])
    expect(alerts).toHaveLength(1)
    expect(alerts[0]).toMatchObject({ kind: 'loss', from: '2024-01-01', to: '2024-03-01', changePercent: -10, days: 60 })
    expect(alerts[0]!.message).toContain('10.0 %')
  })

  it('common practice: 9 % lost in 60 days is not flagged', () => {
    expect(weightChangeAlert([
      { date: '2024-01-01', weightG: 1000 },
      { date: '2024-03-01', weightG: 910 },
    ])).toEqual([])
  })

  it('common practice: a loss spread over more than 90 days is not a 90-day loss', () => {
    expect(weightChangeAlert([
      { date: '2024-01-01', weightG: 1000 },
      { date: '2024-05-01', weightG: 880 },
    ])).toEqual([])
  })

  it('one episode with overlapping windows is reported once, by its largest fall', () => {
    const alerts = weightChangeAlert([
      { date: '2024-03-01', weightG: 850 },
      { date: '2024-01-01', weightG: 1000 },
      { date: '2024-01-31', weightG: 890 },
    ])
    expect(alerts).toHaveLength(1)
    expect(alerts[0]).toMatchObject({ kind: 'loss', from: '2024-01-01', to: '2024-03-01', changePercent: -15 })
  })

  it('two separate losses give two alerts and Date objects are accepted', () => {
    const spring = new Date('2022-04-01T00:00:00Z')
    const alerts = weightChangeAlert([
      { date: spring, weightG: 1200 },
      { date: new Date('2022-05-15T00:00:00Z'), weightG: 1000 },
      { date: '2023-04-01', weightG: 1300 },
      { date: '2023-06-01', weightG: 1100 },
    ])
    expect(alerts.map(a => a.kind)).toEqual(['loss', 'loss'])
    expect(alerts[0]!.from).toBe(spring)
    expect(alerts[0]!.changePercent).toBeCloseTo(-16.667, 3)
    expect(alerts[1]!.changePercent).toBeCloseTo(-15.385, 3)
  })

  const flatYear = [
    { date: '2023-05-01', weightG: 500 },
    { date: '2023-11-01', weightG: 520 },
    { date: '2024-05-01', weightG: 500 },
  ]

  it.each([
    { label: 'growing: true', options: { growing: true }, flagged: true },
    { label: 'growing: false', options: { growing: false }, flagged: false },
    // Common practice: under 5 years old counts as growing (hatched 2021, 3 years old in 2024).
    { label: 'hatched 2021 (3 years old)', options: { hatchYear: 2021 }, flagged: true },
    { label: 'hatched 2015 (9 years old)', options: { hatchYear: 2015 }, flagged: false },
    { label: 'explicit growing overrides age', options: { hatchYear: 2015, growing: true }, flagged: true },
    { label: 'nothing known about growth', options: {}, flagged: false },
  ])('common practice: no gain over a year → $label flagged: $flagged', ({ options, flagged }) => {
    const alerts = weightChangeAlert(flatYear, options)
    if (flagged) {
      expect(alerts).toHaveLength(1)
      expect(alerts[0]).toMatchObject({ kind: 'no_gain', from: '2023-05-01', to: '2024-05-01', changePercent: 0, days: 366 })
    }
    else {
      expect(alerts).toEqual([])
    }
  })

  // Boundaries of the rule (thresholds are common practice, see weightChangeAlert): each pair differs by the
  // smallest step that crosses the threshold, so a changed comparison (< for <=) or constant fails one row.
  it.each([
    { label: 'exactly 365 days flat is a year without gain', days: 365, flagged: true },
    { label: '364 days flat is not yet a year', days: 364, flagged: false },
  ])('common practice, boundary: $label', ({ days, flagged }) => {
    const start = Date.UTC(2023, 4, 1)
    const alerts = weightChangeAlert([
      { date: new Date(start), weightG: 500 },
      { date: new Date(start + days * 86_400_000), weightG: 500 },
    ], { growing: true })
    expect(alerts.map(a => a.kind)).toEqual(flagged ? ['no_gain'] : [])
  })

  it.each([
    { label: 'exactly 10 % in exactly 90 days is flagged', ms: 90 * 86_400_000, to: 900, flagged: true },
    { label: '10 % in 90 days and one minute is outside the window', ms: 90 * 86_400_000 + 60_000, to: 900, flagged: false },
    { label: '9.99 % in exactly 90 days is under the threshold', ms: 90 * 86_400_000, to: 900.1, flagged: false },
  ])('common practice, boundary: $label', ({ ms, to, flagged }) => {
    const start = Date.UTC(2024, 0, 1)
    const alerts = weightChangeAlert([
      { date: new Date(start), weightG: 1000 },
      { date: new Date(start + ms), weightG: to },
    ])
    expect(alerts.map(a => a.kind)).toEqual(flagged ? ['loss'] : [])
  })

  it.each([
    // Common practice: a fish under 5 years old is still growing; its age is counted in the year of the later weighing.
    { label: 'hatched 2020: 4 years old in 2024, still growing', hatchYear: 2020, flagged: true },
    { label: 'hatched 2019: 5 years old in 2024, no longer counted as growing', hatchYear: 2019, flagged: false },
  ])('common practice, boundary of the under-5-years rule: $label', ({ hatchYear, flagged }) => {
    const alerts = weightChangeAlert(flatYear, { hatchYear })
    expect(alerts.map(a => a.kind)).toEqual(flagged ? ['no_gain'] : [])
  })

  it('a growing fish that gained is not flagged', () => {
    expect(weightChangeAlert([
      { date: '2023-05-01', weightG: 500 },
      { date: '2024-05-01', weightG: 640 },
    ], { growing: true })).toEqual([])
  })

  it('less than a year of records cannot show a year without gain', () => {
    expect(weightChangeAlert([
      { date: '2023-05-01', weightG: 500 },
      { date: '2024-04-01', weightG: 480 },
    ], { growing: true })).toEqual([])
  })

  it('thresholds can be changed through the options', () => {
    const measurements = [
      { date: '2024-01-01', weightG: 1000 },
      { date: '2024-02-01', weightG: 950 },
    ]
    expect(weightChangeAlert(measurements)).toEqual([])
    expect(weightChangeAlert(measurements, { lossPercent: 5 })).toHaveLength(1)
  })

  it('empty, single and unusable measurements give no alerts', () => {
    expect(weightChangeAlert([])).toEqual([])
    expect(weightChangeAlert([{ date: '2024-01-01', weightG: 1000 }])).toEqual([])
    expect(weightChangeAlert([
      { date: '2024-01-01', weightG: 1000 },
      { date: 'not a date', weightG: 100 },
      { date: '2024-02-01', weightG: 0 },
      { date: '2024-02-15', weightG: Number.NaN },
    ])).toEqual([])
  })
})
