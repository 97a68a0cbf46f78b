import { describe, expect, it } from 'vitest'
import { addDays, isOverdue, nextHealthCheck, nextWaterTest, checkDaySchema } from '../../shared/utils/due'
import { expectedAmount, pondEventWarnings } from '../../shared/utils/whole-pond-events'

describe('the yearly health check', () => {
  // Rule of this project (shared/utils/due.ts): the pond's check day on or after three months past the last check.
  it.each([
    ['never checked, pond added in January', '04-01', null, '2025-01-10', '2025-04-01'],
    ['never checked, pond added after this spring', '04-01', null, '2026-05-01', '2027-04-01'],
    ['checked a week early counts for that spring', '04-01', '2026-03-25', '2020-01-01', '2027-04-01'],
    ['an autumn check does not replace the next spring one', '04-01', '2026-10-15', '2020-01-01', '2027-04-01'],
    ['checked in January: 90 days on is 5 April, so that spring is covered', '04-01', '2026-01-05', '2020-01-01', '2027-04-01'],
    ['checked late, in July: the next spring', '04-01', '2026-07-05', '2020-01-01', '2027-04-01'],
    ['a pond that checks on 15 May', '05-15', '2026-05-20', '2020-01-01', '2027-05-15'],
  ])('%s', (_case, day, last, since, expected) => {
    expect(nextHealthCheck(day, last, since)).toBe(expected)
  })

  it('takes a day that exists every year', () => {
    expect(checkDaySchema.safeParse('04-01').success).toBe(true)
    expect(checkDaySchema.safeParse('02-29').success).toBe(false)
    expect(checkDaySchema.safeParse('13-01').success).toBe(false)
    expect(checkDaySchema.safeParse('4-1').success).toBe(false)
  })
})

describe('water tests and dates', () => {
  it('counts the interval from the last test, or from the day the pond was added', () => {
    expect(nextWaterTest(7, '2026-06-05', '2026-01-01')).toBe('2026-06-12')
    expect(nextWaterTest(7, null, '2026-12-28')).toBe('2027-01-04') // across the year end
    expect(addDays('2024-02-28', 1)).toBe('2024-02-29') // 2024 is a leap year (Gregorian calendar)
    expect(isOverdue('2026-06-09', '2026-06-10')).toBe(true)
    expect(isOverdue('2026-06-10', '2026-06-10')).toBe(false)
  })
})

describe('whole-pond amounts', () => {
  // Worked by hand: 0.3 % w/v is 3 g/L; 3 g/L × 5,000 L = 15,000 g = 15 kg.
  it('works out salt for the pond volume and questions an amount a digit off', () => {
    expect(expectedAmount('salt', { percent: 0.3 }, 5000)).toEqual({ value: 15, unit: 'kg' })
    expect(pondEventWarnings('salt', { percent: 0.3, amountKg: 15 }, 5000)).toEqual([])
    expect(pondEventWarnings('salt', { percent: 0.3, amountKg: 150 }, 5000).map(w => w.field)).toEqual(['data.amountKg'])
    expect(pondEventWarnings('salt', { percent: 1.5, amountKg: 75 }, 5000).map(w => w.field)).toEqual(['data.percent'])
  })

  // Worked by hand: 2 mg/L × 10,000 L = 20,000 mg = 20 g; mL/L against mL: 0.025 mL/L × 8,000 L = 200 mL.
  it('works out a bath in the unit the person weighed or measured', () => {
    expect(expectedAmount('bath', { concentration: 2, concentrationUnit: 'mg/L', amountUnit: 'g' }, 10_000)).toEqual({ value: 20, unit: 'g' })
    expect(expectedAmount('bath', { concentration: 0.025, concentrationUnit: 'mL/L', amountUnit: 'mL' }, 8000)!.value).toBeCloseTo(200, 9)
    // Mass against volume cannot be compared without the product's density: no warning either way.
    expect(expectedAmount('bath', { concentration: 2, concentrationUnit: 'mg/L', amountUnit: 'mL' }, 10_000)).toBeNull()
    expect(pondEventWarnings('water_change', { litresChanged: 6000 }, 5000).map(w => w.field)).toEqual(['data.litresChanged'])
  })
})
