// What a fish profile costs on first load: the JavaScript bytes on the wire (compressed, as served) stay
// within the budget of issue 11, and the heavy parts (Uppy's uploader, Chart.js) arrive only when the
// person opens the uploader or scrolls to a chart. A size budget, not a timing.
import type { BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, scrollThrough, signIn } from '../support/browser'
import { closeTestDb } from '../support/db'
import { createFish, createPond, signedInUser } from '../support/factories'
import { addEntry, daysAgo } from '../support/timeline'

const PROFILE_BUDGET_BYTES = 150 * 1024
let browser: BrowserContext

beforeAll(async () => {
  browser = await openBrowser(390, 844)
})
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

/** Every script the page receives from now on: its URL, its bytes on the wire and a few strings from its text. */
async function watchScripts(page: Page) {
  const cdp = await browser.newCDPSession(page)
  await cdp.send('Network.enable')
  await cdp.send('Network.setCacheDisabled', { cacheDisabled: true })
  const scripts = new Map<string, { url: string, wireBytes: number }>()
  cdp.on('Network.responseReceived', (e) => {
    if (e.type === 'Script') scripts.set(e.requestId, { url: e.response.url, wireBytes: 0 })
  })
  cdp.on('Network.loadingFinished', (e) => {
    const script = scripts.get(e.requestId)
    if (script) script.wireBytes = e.encodedDataLength
  })
  const texts: string[] = []
  page.on('response', async (response) => {
    if (response.request().resourceType() === 'script') texts.push(await response.text().catch(() => ''))
  })
  return {
    wireBytes: () => [...scripts.values()].reduce((sum, s) => sum + s.wireBytes, 0),
    count: () => scripts.size,
    // Strings that survive minification: Uppy's dashboard class name and Chart.js's own error text.
    hasUppy: () => texts.some(t => t.includes('uppy-Dashboard')),
    hasChartJs: () => texts.some(t => t.includes('Canvas is already in use')),
  }
}

describe('first load of a fish profile', () => {
  it('sends at most 150 KB of compressed JavaScript, and the uploader and chart code only when asked for', async () => {
    const owner = await signedInUser({ name: 'Budget Owner' })
    const pond = await createPond(owner.client)
    const fish = await createFish(owner.client, pond.id, { name: 'Lean' })
    await addEntry(owner.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(3), data: { weightG: 900, lengthCm: 36, lengthType: 'total' } })
    const page = await browser.newPage()
    await signIn(page, owner.email, owner.password)
    // A fresh load of the profile, as when a link is opened: the budget counts only what this load fetches.
    const scripts = await watchScripts(page)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('fish-name').waitFor()
    expect(scripts.count()).toBeGreaterThan(1)
    expect(scripts.wireBytes()).toBeLessThanOrEqual(PROFILE_BUDGET_BYTES)
    expect(scripts.hasUppy()).toBe(false)
    expect(scripts.hasChartJs()).toBe(false)

    await scrollThrough(page)
    await page.getByTestId('growth-chart').waitFor()
    await expect.poll(() => scripts.hasChartJs()).toBe(true)
    await page.getByTestId('add-photos').click()
    await page.locator('.uppy-Dashboard-inner').waitFor()
    await expect.poll(() => scripts.hasUppy()).toBe(true)
    await page.close()
  })
})
