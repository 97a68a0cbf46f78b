import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { BrowserContext, Page } from 'playwright-core'
import { openBrowser, signIn } from '../support/browser'
import { closeTestDb } from '../support/db'
import { pondWithRoles } from '../support/factories'
import { addEntry, sampleEntries } from '../support/timeline'

let browser: BrowserContext
beforeAll(async () => {
  browser = await openBrowser(390, 844)
})
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

/** Heights of the elements a selector finds, as laid out. */
async function heights(page: Page, selector: string) {
  return page.locator(selector).evaluateAll(nodes => nodes.map(n => Math.round(n.getBoundingClientRect().height)))
}

describe('on a 390 px phone', () => {
  it('the floating "+ Add" button leaves the end of the profile uncovered, and small links are 44 px tall targets', async () => {
    const world = await pondWithRoles()
    for (const entry of Object.values(sampleEntries(world.fish.id, world.vet.user.id)).slice(0, 4)) await addEntry(world.vet.client, world.fish.id, entry)
    const page = await browser.newPage()
    await signIn(page, world.keeper.email, world.keeper.password)
    await page.goto(`/fish/${world.fish.id}`, { waitUntil: 'networkidle' })
    const add = page.getByTestId('jump-to-add')
    await add.waitFor()
    await page.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight))
    await page.waitForTimeout(200)
    // Scrolled to the end, no text of the page lies under the button.
    const covered = await page.evaluate(() => {
      const button = document.querySelector('[data-testid="jump-to-add"]')!.getBoundingClientRect()
      const walker = document.createTreeWalker(document.querySelector('.page')!, NodeFilter.SHOW_TEXT)
      const hits: string[] = []
      for (let node = walker.nextNode(); node; node = walker.nextNode()) {
        if (!node.textContent?.trim() || node.parentElement?.closest('[data-testid="jump-to-add"]')) continue
        const range = document.createRange()
        range.selectNodeContents(node)
        for (const r of range.getClientRects()) {
          if (r.width && r.right > button.left && r.left < button.right && r.bottom > button.top && r.top < button.bottom) hits.push(node.textContent.trim())
        }
      }
      return hits
    })
    expect(covered).toEqual([])

    expect(Math.min(...await heights(page, '.back-link'))).toBeGreaterThanOrEqual(44)
    await page.goto(`/ponds/${world.pond.id}`, { waitUntil: 'networkidle' })
    expect(Math.min(...await heights(page, '.back-link'))).toBeGreaterThanOrEqual(44)
    await page.getByTestId('view-table').click()
    const names = await heights(page, 'table a[href^="/fish/"]')
    expect(names.length).toBeGreaterThan(0)
    expect(Math.min(...names)).toBeGreaterThanOrEqual(44)
    await page.goto(`/ponds/${world.pond.id}/fish/new`, { waitUntil: 'networkidle' })
    const radios = await page.locator('label:has(input[type="radio"])').evaluateAll(nodes => nodes.map(n => Math.round(n.getBoundingClientRect().height)))
    expect(radios.length).toBeGreaterThan(0)
    expect(Math.min(...radios)).toBeGreaterThanOrEqual(44)
    await page.close()
  })
})
