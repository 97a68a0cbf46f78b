import type { BrowserContext } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, screenshots } from '../support/browser'
import { closeTestDb } from '../support/db'
import { MAIN_PORT } from '../support/env'
import { createPond, signedInUser, uniqueEmail } from '../support/factories'
import { startCapturingSmtp } from '../support/mail'
import { startServer, type RunningServer } from '../support/server'

// The sender sees where the e-mail of a pending offer stands: queued, failed while the mail service is down,
// and sent after "Resend" once it is back. A server of its own, whose job worker alone sends its mail, to a
// mail port the test opens and closes.
const port = MAIN_PORT + 6
const smtpPort = MAIN_PORT + 7
let server: RunningServer
let browser: BrowserContext

beforeAll(async () => {
  server = await startServer(port, {
    NUXT_JOBS_SCHEMA: 'pgboss_mail_state_browser', NUXT_SMTP_PORT: String(smtpPort),
    NUXT_MAIL_RETRY_LIMIT: '1', NUXT_MAIL_RETRY_DELAY_SECONDS: '1', NUXT_APP_ORIGIN: `http://127.0.0.1:${port}`,
  })
  browser = await openBrowser()
}, 90_000)
afterAll(async () => {
  await browser?.close()
  await server?.stop()
  await closeTestDb()
})

describe('the e-mail state of a pending invitation, in Chromium', () => {
  it('shows the mail failed while the mail service is down, and sent after Resend once it is back', { timeout: 150_000 }, async () => {
    const owner = await signedInUser({ name: 'Inviting Owner' })
    const pond = await createPond(owner.client, { name: 'Mail state pond' })
    const page = await browser.newPage()
    await page.goto(`${server.url}/sign-in`, { waitUntil: 'networkidle' })
    await page.getByLabel('E-mail').fill(owner.email)
    await page.getByLabel('Password').fill(owner.password)
    await page.getByTestId('sign-in-submit').click()
    await page.waitForURL(url => !url.pathname.startsWith('/sign-in'))
    await page.goto(`${server.url}/ponds/${pond.id}/settings`, { waitUntil: 'networkidle' })

    const invitee = uniqueEmail('vet-to-be')
    await page.getByTestId('invite-email').fill(invitee)
    await page.getByTestId('invite-role').selectOption('vet')
    await page.getByTestId('invite-submit').click()
    const row = page.locator('li', { hasText: invitee })
    const state = row.getByTestId('mail-state')
    // Queued first (possibly already retrying); the page asks again by itself until the attempts are used up.
    await expect.poll(() => state.textContent(), { timeout: 10_000 }).toMatch(/E-mail (queued|failed)/)
    await expect.poll(() => state.textContent(), { timeout: 60_000 }).toMatch(/E-mail failed/)
    await screenshots(page, 'invitation-mail-failed')

    const smtp = await startCapturingSmtp(smtpPort)
    try {
      await state.getByTestId('mail-resend').click()
      await expect.poll(() => state.textContent(), { timeout: 60_000 }).toMatch(/E-mail sent/)
      expect(smtp.received.some(mail => mail.to.includes(invitee))).toBe(true)
    }
    finally {
      await smtp.close()
    }
    await page.close()
  })
})
