import { describe, expect, it } from 'vitest'
import { changeWords, latestChange } from '../../shared/utils/chart-summary'

// The sentence under each chart. Relative change = (new − old) / old × 100 (the arithmetic definition of
// percent change); every expected value below is worked by hand beside it.
describe('latestChange and changeWords', () => {
  it.each([
    {
      label: 'derived: 3480 g → 3200 g over 60 days is (3200 − 3480) / 3480 = −8.05 % → "down 8 %"',
      points: [{ at: '2026-03-13T10:00:00Z', value: 3480 }, { at: '2026-05-12T10:00:00Z', value: 3200 }],
      percent: -8, days: 60, words: 'down 8 % in 60 days',
    },
    {
      // The reading compared with is the last one 30 days or more before the latest (10 Apr), not the first (1 Jan) nor the recent 1 May.
      label: 'derived: 2000 g (10 Apr) → 2100 g (12 May) is +5 % in 32 days',
      points: [{ at: '2026-01-01T00:00:00Z', value: 1500 }, { at: '2026-04-10T00:00:00Z', value: 2000 }, { at: '2026-05-01T00:00:00Z', value: 2050 }, { at: '2026-05-12T00:00:00Z', value: 2100 }],
      percent: 5, days: 32, words: 'up 5 % in 32 days',
    },
    {
      // No reading 30 days before: the first one is used. 7.5 → 7.5 is 0 %.
      label: 'derived: pH 7.5 → 7.5 over 6 days is unchanged',
      points: [{ at: '2026-11-24T08:00:00Z', value: 7.5 }, { at: '2026-11-30T08:00:00Z', value: 7.5 }],
      percent: 0, days: 6, words: 'unchanged in 6 days',
    },
  ])('$label', ({ points, percent, days, words }) => {
    // Given out of order on purpose: the readings are sorted by time first.
    const change = latestChange([...points].reverse())!
    expect(change.changePercent).toBe(percent)
    expect(change.days).toBe(days)
    expect(changeWords(change)).toBe(words)
  })

  it('says nothing about a change with one reading, and nothing at all with none', () => {
    const one = latestChange([{ at: '2026-05-12T10:00:00Z', value: 3200 }])!
    expect(one.latest.value).toBe(3200)
    expect(one.earlier).toBeNull()
    expect(changeWords(one)).toBe('')
    expect(latestChange([])).toBeNull()
  })
})
