import { TIME_ZONE_COOKIE, knownTimeZone, localeFromAcceptLanguage } from '#shared/utils/dates'

// The server render picks the reader's locale and time zone; the browser keeps that value through
// hydration (same text both sides) and, if its own time zone differs, switches to it afterwards and
// remembers it in a cookie so the next server render already uses it.
export default defineNuxtPlugin((nuxtApp) => {
  const style = useDateStyleState()
  const zoneCookie = useCookie<string | null>(TIME_ZONE_COOKIE, { maxAge: 400 * 86_400, sameSite: 'lax', path: '/', default: () => null })
  if (import.meta.server) {
    style.value = {
      locale: localeFromAcceptLanguage(useRequestHeader('accept-language')),
      timeZone: knownTimeZone(zoneCookie.value) ?? 'UTC',
    }
    return
  }
  const browserZone = knownTimeZone(Intl.DateTimeFormat().resolvedOptions().timeZone) ?? 'UTC'
  if (zoneCookie.value !== browserZone) zoneCookie.value = browserZone
  if (style.value.timeZone !== browserZone) {
    nuxtApp.hook('app:suspense:resolve', () => {
      style.value = { ...style.value, timeZone: browserZone }
    })
  }
})
