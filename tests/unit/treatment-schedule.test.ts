import { describe, expect, it } from 'vitest'
import { doseDueAt, treatmentSchedule } from '../../shared/utils/treatment-schedule'

// Plain clock arithmetic: dose n is due (n − 1) × interval hours after the first.
describe('treatmentSchedule', () => {
  const course = { doseCount: 3, intervalHours: 24, firstDoseAt: '2026-03-01T09:00:00.000Z' }

  it('lays the doses out from the first one', () => {
    expect(doseDueAt(course, '2026-02-28T10:00:00.000Z', 3)).toBe('2026-03-03T09:00:00.000Z')
    // Without a first-dose time, the entry's own time is the first dose.
    expect(doseDueAt({ doseCount: 2, intervalHours: 12 }, '2026-02-28T10:00:00.000Z', 2)).toBe('2026-02-28T22:00:00.000Z')
  })

  it('marks a dose whose time passed without being given as missed', () => {
    const given = [{ doseNumber: 1, givenAt: '2026-03-01T09:10:00.000Z', givenBy: { id: 'k', name: 'Keeper' }, note: '' }]
    const schedule = treatmentSchedule(course, '2026-03-01T09:00:00.000Z', given, new Date('2026-03-02T12:00:00Z'))!
    expect(schedule.slots.map(s => s.state)).toEqual(['given', 'missed', 'due'])
    expect(schedule).toMatchObject({ given: 1, missed: 1, nextDueAt: '2026-03-03T09:00:00.000Z' })
  })

  it('has no schedule for a treatment recorded without a number of doses', () => {
    expect(treatmentSchedule({}, '2026-03-01T09:00:00.000Z', [])).toBeNull()
  })
})
