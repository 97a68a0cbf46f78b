import {
  formatDate, formatDateTime, formatDay, formatMonth, formatTime, type DateStyle,
} from '#shared/utils/dates'

/**
 * The reader's locale and time zone. The server render decides them (Accept-Language, the time-zone
 * cookie or UTC) and the payload hands the same value to the browser, so both print the same text.
 */
export function useDateStyleState() {
  return useState<Required<DateStyle>>('date-style', () => ({ locale: 'en-GB', timeZone: 'UTC' }))
}

/** Dates in the one style of the app, in the reader's locale: `const dates = useDateStyle()`, then `dates.date(iso)`. */
export function useDateStyle() {
  const style = useDateStyleState()
  return {
    style,
    /** "2 Dec 2026" (en-GB) or "Dec 2, 2026" (en-US). */
    date: (value: string | number | Date) => formatDate(value, style.value),
    /** "14:05" (or "2:05 PM" where the locale writes it so). */
    time: (value: string | number | Date) => formatTime(value, style.value),
    dateTime: (value: string | number | Date) => formatDateTime(value, style.value),
    /** A stored calendar day (YYYY-MM-DD), never shifted by a time zone. */
    day: (value: string) => formatDay(value, style.value),
    month: (value: string | number | Date) => formatMonth(value, style.value),
  }
}
