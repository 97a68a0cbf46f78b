// One date style for the whole app: day, short month name and year in the reader's own order
// ("2 Dec 2026", "Dec 2, 2026"), times in the form their locale uses (24-hour unless it says
// otherwise). Pages pass the person's locale and time zone so server and browser print the same.

export interface DateStyle { locale?: string, timeZone?: string }

const cache = new Map<string, Intl.DateTimeFormat>()

function formatter(style: DateStyle, options: Intl.DateTimeFormatOptions) {
  const key = JSON.stringify([style.locale, style.timeZone, options])
  let found = cache.get(key)
  if (!found) {
    try {
      found = new Intl.DateTimeFormat(style.locale ?? 'en-GB', { ...options, timeZone: style.timeZone })
    }
    catch {
      found = new Intl.DateTimeFormat('en-GB', options)
    }
    cache.set(key, found)
  }
  return found
}

const DAY: Intl.DateTimeFormatOptions = { day: 'numeric', month: 'short', year: 'numeric' }
const TIME: Intl.DateTimeFormatOptions = { hour: '2-digit', minute: '2-digit' }

const asDate = (value: string | number | Date) => (value instanceof Date ? value : new Date(value))

/** A moment's calendar day in the reader's time zone: "2 Dec 2026". */
export function formatDate(value: string | number | Date, style: DateStyle = {}) {
  const date = asDate(value)
  return Number.isNaN(date.getTime()) ? '' : formatter(style, DAY).format(date)
}

/** A moment's time of day: "14:05" (or "2:05 PM" where the locale writes it so). */
export function formatTime(value: string | number | Date, style: DateStyle = {}) {
  const date = asDate(value)
  return Number.isNaN(date.getTime()) ? '' : formatter(style, TIME).format(date)
}

/** "2 Dec 2026, 14:05". */
export function formatDateTime(value: string | number | Date, style: DateStyle = {}) {
  const date = asDate(value)
  return Number.isNaN(date.getTime()) ? '' : formatter(style, { ...DAY, ...TIME }).format(date)
}

/** A stored calendar day (YYYY-MM-DD), shown the same way with no time-zone shift. */
export function formatDay(day: string, style: DateStyle = {}) {
  if (!/^\d{4}-\d{2}-\d{2}/.test(day)) return ''
  return formatter({ locale: style.locale, timeZone: 'UTC' }, DAY).format(new Date(`${day.slice(0, 10)}T12:00:00Z`))
}

/** "Dec 2026", for chart ticks and month-precise dates. */
export function formatMonth(value: string | number | Date, style: DateStyle = {}) {
  const date = asDate(value)
  return Number.isNaN(date.getTime()) ? '' : formatter(style, { month: 'short', year: 'numeric' }).format(date)
}

/** The language the reader asked for first (Accept-Language, by weight) that Intl can format dates in. */
export function localeFromAcceptLanguage(header: string | null | undefined, fallback = 'en-GB'): string {
  const wanted = String(header ?? '').split(',')
    .map((part, index) => {
      const [tag = '', ...params] = part.trim().split(';')
      const q = Number(params.map(p => p.trim()).find(p => p.startsWith('q='))?.slice(2) ?? 1)
      return { tag: tag.trim(), q: Number.isFinite(q) ? q : 0, index }
    })
    .filter(w => w.tag && w.tag !== '*' && w.q > 0)
    .sort((a, b) => b.q - a.q || a.index - b.index)
  for (const { tag } of wanted) {
    try {
      const [supported] = Intl.DateTimeFormat.supportedLocalesOf(tag)
      if (supported) return supported
    }
    catch {
      // A malformed tag is skipped, not an error: the header comes from any client.
    }
  }
  return fallback
}

/** An IANA time zone name Intl knows ("Europe/London"), else null. */
export function knownTimeZone(name: unknown): string | null {
  if (typeof name !== 'string' || !name || name.length > 64) return null
  try {
    return new Intl.DateTimeFormat('en', { timeZone: name }).resolvedOptions().timeZone
  }
  catch {
    return null
  }
}

/** The cookie in which the browser tells the server its time zone, so the server render prints the reader's dates. */
export const TIME_ZONE_COOKIE = 'fintrail_tz'
