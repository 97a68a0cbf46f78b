import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { BrowserContext, Page } from 'playwright-core'
import { openBrowser, screenshots, signIn } from '../support/browser'
import { closeTestDb } from '../support/db'
import { createFish, pondWithRoles, signedInUser } from '../support/factories'
import { entriesOfKind, tokenFromMail } from '../support/custody'
import { makeJpeg } from '../support/photos'

// The main paths done with the keyboard alone: sign in, open the pond, open the fish, add a weight, upload a
// photo, accept an invitation. No clicks and no programmatic focus: only Tab, Shift+Tab, Enter, Escape and typing
// (the system file chooser is answered by the test, as it lies outside the page).

let browser: BrowserContext
beforeAll(async () => {
  browser = await openBrowser(1280, 900)
})
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

interface Focused { testid: string | null, id: string, tag: string, text: string, label: string, outlineStyle: string, outlineWidth: number, inDialog: boolean }

async function focused(page: Page): Promise<Focused> {
  return page.evaluate(() => {
    const el = document.activeElement as HTMLElement
    const style = getComputedStyle(el)
    return {
      testid: el.getAttribute('data-testid'), id: el.id, tag: el.tagName.toLowerCase(), text: (el.textContent ?? '').trim().slice(0, 60), label: el.getAttribute('aria-label') ?? '',
      outlineStyle: style.outlineStyle, outlineWidth: Number.parseFloat(style.outlineWidth), inDialog: Boolean(el.closest('[role="dialog"]')),
    }
  })
}

/** Presses Tab until the focused element matches, as a person would; fails after `limit` presses. */
async function tabTo(page: Page, matches: (f: Focused) => boolean, what: string, limit = 60) {
  for (let i = 0; i < limit; i++) {
    await page.keyboard.press('Tab')
    const now = await focused(page)
    if (matches(now)) {
      // A visible focus ring on everything reached by Tab (WCAG 2.4.7).
      expect(now.outlineStyle, `${what} has no focus ring`).not.toBe('none')
      expect(now.outlineWidth, `${what} focus ring width`).toBeGreaterThanOrEqual(2)
      return now
    }
  }
  throw new Error(`${what} was not reached with ${limit} presses of Tab`)
}

describe('the keyboard alone', () => {
  it('signs in, opens a fish, adds a weight; the form keeps focus inside, closes on Escape and gives focus back', { timeout: 120_000 }, async () => {
    const world = await pondWithRoles()
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Keyboard Kohaku' })
    await browser.clearCookies()
    const page = await browser.newPage()
    await page.goto('/sign-in', { waitUntil: 'networkidle' })

    await tabTo(page, f => f.id === 'email', 'the e-mail field')
    await page.keyboard.type(world.keeper.email)
    await tabTo(page, f => f.id === 'password', 'the password field')
    await page.keyboard.type(world.keeper.password)
    await page.keyboard.press('Enter')
    await page.waitForURL(url => !url.pathname.startsWith('/sign-in'))
    await page.waitForLoadState('networkidle')

    await tabTo(page, f => f.testid === `pond-${world.pond.name}`, 'the pond')
    await page.keyboard.press('Enter')
    await page.waitForURL(`**/ponds/${world.pond.id}`)
    await page.waitForLoadState('networkidle')
    await tabTo(page, f => f.testid === `fish-card-${fish.name}`, 'the fish card')
    await page.keyboard.press('Enter')
    await page.waitForURL(`**/fish/${fish.id}`)
    await page.waitForLoadState('networkidle')

    // Escape closes the form and focus goes back to the button that opened it.
    await tabTo(page, f => f.testid === 'add-measurement', 'the add-weight button')
    await page.keyboard.press('Enter')
    await page.getByTestId('entry-form').waitFor()
    expect((await focused(page)).inDialog).toBe(true)
    await page.keyboard.press('Escape')
    await page.getByTestId('entry-form').waitFor({ state: 'detached' })
    // Focus comes back once the form has gone, a moment after it leaves the page.
    await expect.poll(async () => (await focused(page)).testid).toBe('add-measurement')

    // Open again: Tab and Shift+Tab go round inside the dialog, never to the page behind it.
    await page.keyboard.press('Enter')
    await page.getByTestId('entry-form').waitFor()
    for (let i = 0; i < 25; i++) {
      await page.keyboard.press('Tab')
      expect((await focused(page)).inDialog, `Tab ${i + 1} left the dialog`).toBe(true)
    }
    for (let i = 0; i < 25; i++) {
      await page.keyboard.press('Shift+Tab')
      expect((await focused(page)).inDialog, `Shift+Tab ${i + 1} left the dialog`).toBe(true)
    }

    const weightField = await tabTo(page, f => f.id === 'data.weightG', 'the weight field')
    expect(weightField.inDialog).toBe(true)
    await page.keyboard.type('1250')
    await screenshots(page, 'keyboard-weight-form')
    // Enter in a field sends the form, as in any web form.
    await page.keyboard.press('Enter')
    await page.getByTestId('entry-form').waitFor({ state: 'detached' })
    await expect.poll(async () => (await focused(page)).testid).toBe('add-measurement')
    await expect.poll(async () => (await entriesOfKind(fish.id, 'measurement')).map(e => e.data.weightG)).toEqual([1250])
    await page.getByTestId('entry-measurement').first().waitFor()
    await page.close()
  })

  it('uploads a photo and opens it in the viewer, which Escape closes, giving focus back to the photo', { timeout: 120_000 }, async () => {
    const world = await pondWithRoles()
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Keyboard Asagi' })
    const photo = join(mkdtempSync(join(tmpdir(), 'keyboard-photo-')), 'from-above.jpg')
    writeFileSync(photo, await makeJpeg({ width: 1200, height: 900 }))
    const page = await browser.newPage()
    // Listen for the chooser long before it opens: Playwright turns interception on asynchronously, and a listener
    // added in the same breath as the key press can miss a chooser that opens at once.
    const chooserOpened = page.waitForEvent('filechooser', { timeout: 90_000 })
    // Awaited below; if the test fails before that, the closing page must not surface as a second, unhandled error.
    chooserOpened.catch(() => undefined)
    await signIn(page, world.owner.email, world.owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })

    await tabTo(page, f => f.testid === 'add-photos', 'the add-photos button')
    await page.keyboard.press('Enter')
    await page.locator('.uppy-Dashboard-inner').waitFor()
    // The library button opens the system's file chooser (outside the page); the file is handed to it there.
    await tabTo(page, f => f.text.includes('choose from the library'), 'the library button')
    await page.keyboard.press('Enter')
    const chooser = await chooserOpened
    await chooser.setFiles(photo)
    await tabTo(page, f => /Upload 1 photo/.test(f.text), 'the upload button')
    await page.keyboard.press('Enter')
    await page.locator('.uppy-StatusBar.is-complete').waitFor({ timeout: 60_000 })
    await page.getByTestId('photo-thumb').first().waitFor({ timeout: 60_000 })

    const opener = await tabTo(page, f => f.label.startsWith('Open the photo'), 'the photo in the gallery')
    await page.keyboard.press('Enter')
    await page.getByTestId('photo-large').waitFor()
    expect(await page.evaluate(() => Boolean(document.activeElement?.closest('dialog[open]')))).toBe(true)
    await page.keyboard.press('Escape')
    await page.getByTestId('photo-large').waitFor({ state: 'detached' })
    await expect.poll(async () => (await focused(page)).label).toBe(opener.label)
    await page.close()
  })

  it('accepts an invitation', { timeout: 60_000 }, async () => {
    const world = await pondWithRoles()
    const guest = await signedInUser({ name: 'Keyboard Guest' })
    const since = new Date()
    expect((await world.owner.client.post(`/api/ponds/${world.pond.id}/invitations`, { email: guest.email, role: 'keeper' })).status).toBe(201)
    const token = await tokenFromMail(guest.email, world.pond.name, '/invitations/', since)
    const page = await browser.newPage()
    await signIn(page, guest.email, guest.password)
    await page.goto(`/invitations/${token}`, { waitUntil: 'networkidle' })
    await tabTo(page, f => f.testid === 'accept-invitation', 'the accept button')
    await page.keyboard.press('Enter')
    await page.waitForURL(`**/ponds/${world.pond.id}`)
    await page.close()
  })

  it('a refused form puts focus on the first field with a message, which is linked to the field', async () => {
    await browser.clearCookies()
    const page = await browser.newPage()
    await page.goto('/sign-in', { waitUntil: 'networkidle' })
    await tabTo(page, f => f.testid === 'sign-in-submit', 'the sign-in button')
    await page.keyboard.press('Enter')
    await expect.poll(async () => (await focused(page)).id).toBe('email')
    const described = await page.locator('#email').getAttribute('aria-describedby')
    expect(described).toBeTruthy()
    expect(await page.locator(`[id="${described}"]`).textContent()).toMatch(/\S/)
    expect(await page.locator('#email').getAttribute('aria-invalid')).toBe('true')
    // The summary message is announced as it appears.
    expect(await page.getByRole('alert').first().textContent()).toMatch(/\S/)
    await page.close()
  })
})
