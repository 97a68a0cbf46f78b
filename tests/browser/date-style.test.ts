import { afterAll, describe, expect, it } from 'vitest'
import type { BrowserContext, Page } from 'playwright-core'
import { openBrowser, screenshots, signIn } from '../support/browser'
import { testDb } from '../support/db'
import { pondWithRoles } from '../support/factories'
import { addEntry } from '../support/timeline'

const contexts: BrowserContext[] = []
afterAll(async () => {
  await Promise.all(contexts.map(c => c.close()))
})

/** The text of every <time> and dated element in some HTML, read the way the browser reads the live page. */
async function datedTexts(page: Page, html?: string) {
  return page.evaluate((source) => {
    const root = source ? new DOMParser().parseFromString(source, 'text/html') : document
    return [...root.querySelectorAll('article[id^="entry-"] header, [data-testid="fact-weight"], [data-testid="fact-eyes"], [data-testid="fish-residences"], [data-testid="fish-acquired"]')]
      .map(element => (element.textContent ?? '').replace(/\s+/g, ' ').trim())
  }, html)
}

describe('one date style, the reader’s own', () => {
  // The same moments seen from a US and a British browser: day order and clock follow the locale,
  // and the server render already prints what the browser shows after hydration.
  it.each([
    { locale: 'en-US', timezoneId: 'America/Chicago', day: 'Apr 18, 2023', acquired: 'Apr 11, 2021', weighed: /Mar 3, 2026/, clock: /\d{1,2}:\d{2}\s?(AM|PM)/ },
    { locale: 'en-GB', timezoneId: 'Europe/London', day: '18 Apr 2023', acquired: '11 Apr 2021', weighed: /3 Mar 2026/, clock: /\d{2}:\d{2}(?!\s?[AP]M)/ },
  ])('$locale: the same text on the server render and after hydration', async ({ locale, timezoneId, day, acquired, weighed, clock }) => {
    const world = await pondWithRoles()
    await addEntry(world.vet.client, world.fish.id, { kind: 'procedure', occurredAt: '2023-04-18', data: { code: 'enucleation', name: 'enucleation', bodySite: 'eye', side: 'left', performedBy: 'Dr Test Vet' } })
    // A calendar day of the profile (no time zone can shift it), written in the same style as every date.
    await testDb().query(`update fish set acquired_on = '2021-04-11' where id = $1`, [world.fish.id])
    await addEntry(world.keeper.client, world.fish.id, { kind: 'measurement', occurredAt: '2026-03-03T15:30:00Z', data: { weightG: 1200, lengthCm: 40, lengthType: 'total' } })
    const browser = await openBrowser(1280, 900, { locale, timezoneId })
    contexts.push(browser)
    const page = await browser.newPage()
    await signIn(page, world.keeper.email, world.keeper.password)
    // The first visit tells the server the browser's time zone (a cookie); from then on both sides agree.
    await page.goto(`/fish/${world.fish.id}`, { waitUntil: 'networkidle' })
    const cookie = (await browser.cookies()).find(c => c.name === 'fintrail_tz')
    expect(cookie?.value).toBe(timezoneId.replace('/', '%2F'))

    const response = await page.goto(`/fish/${world.fish.id}`, { waitUntil: 'networkidle' })
    const served = await datedTexts(page, await response!.text())
    const hydrated = await datedTexts(page)
    expect(served.length).toBeGreaterThan(3)
    expect(hydrated).toEqual(served)
    const all = served.join(' | ')
    expect(all).toContain(`left eye removed ${day}`)
    expect(all).toMatch(weighed)
    expect(all).toContain(acquired)
    expect(all).toMatch(clock)
    // 15:30 UTC is 09:30 in Chicago (CST) and 15:30 in London (GMT) on 3 March 2026.
    expect(all).toContain(locale === 'en-US' ? '09:30 AM' : '15:30')
    await screenshots(page, `fish-profile-${locale}`)
  })
})
