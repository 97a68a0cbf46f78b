import { describe, expect, it } from 'vitest'
import { formatDate, formatDateTime, formatDay, formatTime, knownTimeZone, localeFromAcceptLanguage } from '../../shared/utils/dates'

// Expected texts are the date patterns of the Unicode CLDR locale data (as shipped in Node's ICU):
// en-GB writes day month year and a 24-hour clock, en-US month day, year and a 12-hour clock.
const MOMENT = '2026-03-03T15:30:00Z'

describe('one date style, following the reader', () => {
  it.each([
    { locale: 'en-GB', timeZone: 'Europe/London', date: '3 Mar 2026', time: '15:30' },
    { locale: 'en-US', timeZone: 'America/Chicago', date: 'Mar 3, 2026', time: '09:30 AM' },
    { locale: 'de-DE', timeZone: 'Europe/Berlin', date: '3. März 2026', time: '16:30' },
  ])('$locale in $timeZone', ({ locale, timeZone, date, time }) => {
    expect(formatDate(MOMENT, { locale, timeZone })).toBe(date)
    expect(formatTime(MOMENT, { locale, timeZone })).toBe(time)
    expect(formatDateTime(MOMENT, { locale, timeZone })).toContain(time)
  })

  it('shows a stored calendar day on that day in every time zone', () => {
    expect(formatDay('2023-04-18', { locale: 'en-US', timeZone: 'Pacific/Kiritimati' })).toBe('Apr 18, 2023')
    expect(formatDay('2023-04-18', { locale: 'en-GB', timeZone: 'Pacific/Pago_Pago' })).toBe('18 Apr 2023')
    expect(formatDay('not a day')).toBe('')
  })

  it.each([
    { header: 'en-US,en;q=0.9', locale: 'en-US' },
    { header: 'fr-CH, fr;q=0.9, en;q=0.8, de;q=0.7, *;q=0.5', locale: 'fr-CH' },
    { header: 'en;q=0.5, en-GB;q=0.9', locale: 'en-GB' },
    { header: 'x-klingon-zz, en-AU;q=0.8', locale: 'en-AU' },
    { header: '', locale: 'en-GB' },
    { header: undefined, locale: 'en-GB' },
    { header: '*', locale: 'en-GB' },
  ])('reads "$header" as $locale (RFC 9110 §12.5.4 weights)', ({ header, locale }) => {
    expect(localeFromAcceptLanguage(header)).toBe(locale)
  })

  it('accepts only time zones Intl knows', () => {
    expect(knownTimeZone('Europe/London')).toBe('Europe/London')
    expect(knownTimeZone('Mars/Olympus_Mons')).toBeNull()
    expect(knownTimeZone(42)).toBeNull()
    expect(knownTimeZone('')).toBeNull()
  })
})
