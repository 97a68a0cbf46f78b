import type { H3Event } from 'h3'
import { TIME_ZONE_COOKIE, knownTimeZone, localeFromAcceptLanguage, type DateStyle } from '#shared/utils/dates'

/** The date style of whoever sent this request: their browser's language and (once it has told us) time zone. */
export function requestDateStyle(event: H3Event): Required<DateStyle> {
  return {
    locale: localeFromAcceptLanguage(getRequestHeader(event, 'accept-language')),
    timeZone: knownTimeZone(getCookie(event, TIME_ZONE_COOKIE)) ?? 'UTC',
  }
}
