import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { BrowserContext } from 'playwright-core'
import { openBrowser, screenshots, signIn } from '../support/browser'
import { linkIn, waitForMail } from '../support/mail'
import { testMicrochip, uniqueEmail } from '../support/factories'

const DEMO_PASSWORD = 'pondside-demo-2026'
let browser: BrowserContext

beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser?.close()
})

describe('the register in Chromium', () => {
  it('lets the demo owner add a fish, find it in the list and open its profile', async () => {
    const page = await browser.newPage()
    await signIn(page, 'helen.marlow@example.com', DEMO_PASSWORD)
    await expect.poll(() => page.getByTestId('pond-Garden pond').isVisible()).toBe(true)
    await screenshots(page, 'home-owner')
    await page.getByTestId('pond-Garden pond').click()
    await page.getByTestId('pond-name').waitFor()
    await screenshots(page, 'pond-cards')
    await page.getByTestId('add-fish').click()
    const name = `Sumi ${Date.now() % 100000}`
    const chip = testMicrochip()
    await page.getByLabel('Name', { exact: true }).fill(name)
    await page.getByLabel('Variety').fill('Sumi Goromo')
    await page.getByRole('textbox', { name: 'Hatch year' }).fill('2020')
    await page.getByLabel('Microchip (ISO 11784, 15 digits)').fill('12345')
    await page.getByTestId('fish-submit').click()
    await expect.poll(() => page.getByTestId('error-microchip').textContent()).toMatch(/15 digits/)
    await screenshots(page, 'fish-form-errors')
    await page.getByLabel('Microchip (ISO 11784, 15 digits)').fill(chip)
    await page.getByTestId('fish-submit').click()
    await page.waitForURL(/\/fish\/[0-9a-f-]{36}$/)
    await expect.poll(() => page.getByTestId('fish-name').textContent()).toContain(name)

    await page.getByRole('link', { name: '← Garden pond' }).click()
    await page.getByTestId('fish-search').fill(chip.slice(0, 9))
    await expect.poll(() => page.locator('[data-testid^="fish-card-"]').count()).toBe(1)
    await page.getByTestId(`fish-card-${name}`).click()
    await expect.poll(() => page.getByTestId('fish-microchip').textContent()).toContain(`${chip.slice(0, 3)} ${chip.slice(3)}`)
    await screenshots(page, 'fish-profile')
    await page.goBack()
    await page.getByTestId('fish-search').fill('')
    await page.getByTestId('view-table').click()
    await page.getByTestId('fish-table').waitFor()
    await screenshots(page, 'pond-table')
    await page.close()
  })

  it('shows the vet every client pond, and the other client only their own', async () => {
    const vetPage = await browser.newPage()
    await signIn(vetPage, 'ada.okafor@example.com', DEMO_PASSWORD)
    await vetPage.getByTestId('pond-Whitlock koi pond').waitFor()
    expect(await vetPage.getByTestId('pond-Garden pond').isVisible()).toBe(true)
    await screenshots(vetPage, 'home-vet')
    await vetPage.getByTestId('sign-out').click()
    await vetPage.waitForURL(/\/sign-in/)
    await vetPage.close()

    const clientPage = await browser.newPage()
    await signIn(clientPage, 'sam.whitlock@example.com', DEMO_PASSWORD)
    await clientPage.getByTestId('pond-Whitlock koi pond').waitFor()
    expect(await clientPage.getByTestId('pond-Garden pond').count()).toBe(0)
    expect(await clientPage.getByTestId('pond-Courtyard pond').count()).toBe(0)
    await clientPage.getByTestId('sign-out').click()
    await clientPage.close()
  })

  it('invites a keeper who accepts through the link from the mail', async () => {
    const owner = await browser.newPage()
    await signIn(owner, 'helen.marlow@example.com', DEMO_PASSWORD)
    await owner.getByTestId('pond-Courtyard pond').click()
    await owner.getByRole('link', { name: 'Pond & people' }).click()
    const email = uniqueEmail('sitter')
    await owner.getByTestId('invite-email').fill(email)
    await owner.getByTestId('invite-role').selectOption('keeper')
    await owner.getByTestId('invite-submit').click()
    await expect.poll(() => owner.getByText(`Invitation sent to ${email}.`).isVisible()).toBe(true)
    await screenshots(owner, 'pond-people')
    await owner.close()

    const link = linkIn(await waitForMail(email, m => m.subject.includes('Courtyard pond')), '/invitations/')
    const invitee = await openBrowser(390, 844)
    try {
      const page = await invitee.newPage()
      await page.goto(new URL(link).pathname)
      await page.getByTestId('invitation-sign-up').click()
      await page.getByLabel('Your name').fill('Nadia Sitter')
      expect(await page.getByLabel('E-mail').inputValue()).toBe(email)
      await page.getByLabel('Password').fill('holiday pond sitting')
      await page.getByTestId('sign-up-submit').click()
      await page.getByTestId('accept-invitation').click()
      await page.waitForURL(/\/ponds\/[0-9a-f-]{36}$/)
      await expect.poll(() => page.getByTestId('pond-name').textContent()).toContain('Courtyard pond')
      expect(await page.getByTestId('add-fish').isVisible()).toBe(true)
    }
    finally {
      await invitee.close()
    }
  })
})
