import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { MAIN_URL } from '../support/env'
import { signedInUser } from '../support/factories'

const chromium = browserForFile()

describe('the account page in Chromium', () => {
  it('shows which units and decimal mark are chosen, and keeps a change', async () => {
    const person = await signedInUser({ name: 'Nell Ashby' })
    const page = await chromium.context.newPage()
    await signIn(page, person.email, person.password)
    await page.goto('/account', { waitUntil: 'networkidle' })
    await expect.poll(() => page.getByTestId('units-metric').getAttribute('aria-pressed')).toBe('true')
    expect(await page.getByTestId('units-us').getAttribute('aria-pressed')).toBe('false')
    await page.getByTestId('units-us').click()
    await expect.poll(() => page.getByTestId('units-us').getAttribute('aria-pressed')).toBe('true')
    await page.getByTestId('decimal-comma').click()
    await expect.poll(() => page.getByTestId('decimal-comma').getAttribute('aria-pressed')).toBe('true')
    await page.reload({ waitUntil: 'networkidle' })
    await expect.poll(() => page.getByTestId('units-us').getAttribute('aria-pressed')).toBe('true')
    expect(await page.getByTestId('decimal-point').getAttribute('aria-pressed')).toBe('false')

    // A wrong current password is refused under its own field and nothing changes.
    await page.getByLabel('Current password').fill('not the password at all')
    await page.getByLabel('New password').fill('a brand new pond password')
    await page.getByRole('button', { name: 'Change password' }).click()
    await expect.poll(() => page.getByTestId('error-currentPassword').textContent()).toContain('The current password is wrong')
    await screenshots(page, 'account')
    await page.close()
  })
  it('goes back to the page that asked for a sign-in, and never to another site', async () => {
    const person = await signedInUser({ name: 'Ora Quill' })
    const page = await chromium.context.newPage()
    for (const [next, expected] of [['/account', '/account'], ['//elsewhere.example/pond', '/'], ['https://elsewhere.example/', '/']] as const) {
      await page.context().clearCookies()
      await page.goto(`/sign-in?next=${encodeURIComponent(next)}`, { waitUntil: 'networkidle' })
      await page.getByLabel('E-mail').fill(person.email)
      await page.getByLabel('Password').fill(person.password)
      await page.getByTestId('sign-in-submit').click()
      await page.waitForURL(url => !url.pathname.startsWith('/sign-in'))
      const landed = new URL(page.url())
      expect(landed.origin, `after ?next=${next}`).toBe(new URL(MAIN_URL).origin)
      expect(landed.pathname, `after ?next=${next}`).toBe(expected)
    }
    await page.close()
  })
})
