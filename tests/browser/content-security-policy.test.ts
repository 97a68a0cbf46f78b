import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser, scrollThrough, signIn } from '../support/browser'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_URL } from '../support/env'
import { pondWithRoles } from '../support/factories'
import { makeKoiPhoto } from '../support/photos'
import { daysAgo } from '../support/timeline'

// Every page under the app's Content-Security-Policy, as the people who use it see it: any refusal the
// browser reports (a `securitypolicyviolation` event or its console message) fails the test.
const DEMO_PASSWORD = 'pondside-demo-2026'
const OWNER = 'helen.marlow@example.com'
const KEEPER = 'tom.marlow@example.com'
const VET = 'ada.okafor@example.com'

let browser: BrowserContext
const violations = new Map<Page, string[]>()
const files = mkdtempSync(join(tmpdir(), 'fintrail-csp-'))

beforeAll(async () => {
  browser = await openBrowser()
  // The event is caught by a listener the test adds before any page script runs (test tooling is not
  // subject to the page's policy); the console line catches what Chromium reports without an event.
  await browser.exposeBinding('__fintrailCspViolation', ({ page }, text: string) => {
    violations.get(page)?.push(`${page.url()}: ${text}`)
  })
  await browser.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      const report = (window as unknown as { __fintrailCspViolation: (text: string) => void }).__fintrailCspViolation
      report(`${e.effectiveDirective} refused ${e.blockedURI || '(inline)'} at ${e.sourceFile}:${e.lineNumber}`)
    })
  })
})
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

async function watchedPage() {
  const page = await browser.newPage()
  const list: string[] = []
  violations.set(page, list)
  page.on('console', (message) => {
    if (/Content Security Policy|Refused to/i.test(message.text())) list.push(`${page.url()}: console: ${message.text()}`)
  })
  return { page, list }
}

/** Opens a page, waits until its requests are done and its client-only parts have mounted. */
async function visit(page: Page, path: string) {
  const response = await page.goto(path, { waitUntil: 'networkidle' })
  expect(response?.status(), path).toBeLessThan(500)
  // Parts that load when seen (charts, the timeline's later pages) load too.
  await scrollThrough(page)
  await page.waitForTimeout(300)
}

async function idsOf() {
  const db = testDb()
  const { rows: ponds } = await db.query(`select id, name from ponds where name in ('Garden pond', 'Whitlock koi pond')`)
  const garden = ponds.find(p => p.name === 'Garden pond')!.id as string
  const { rows: [fish] } = await db.query(`select f.id from fish f join photos p on p.fish_id = f.id and p.state = 'ready'
    join timeline_entries t on t.fish_id = f.id and t.kind = 'measurement' where f.pond_id = $1 group by f.id order by count(distinct p.id) desc limit 1`, [garden])
  return { garden, fish: fish.id as string }
}

/** Replaces window.print with a counter, so a click reaches it without opening the print dialog. */
async function countPrints(page: Page) {
  await page.evaluate(() => {
    const counted = window as unknown as { printed: number }
    counted.printed = 0
    window.print = () => {
      counted.printed += 1
    }
  })
}

/** The pages every signed-in person has, for a pond and a fish of it. */
function signedInPages(pondId: string, fishId: string) {
  return [
    '/', '/account', '/due', '/outbox', '/ponds/new', '/ponds/import',
    `/ponds/${pondId}`, `/ponds/${pondId}/settings`, `/ponds/${pondId}/import`, `/ponds/${pondId}/water`,
    `/ponds/${pondId}/doses`, `/ponds/${pondId}/fish/new`,
    `/fish/${fishId}`, `/fish/${fishId}/edit`, `/fish/${fishId}/record`,
    // A page that does not exist, for the error page.
    `/fish/00000000-0000-4000-8000-000000000000`,
  ]
}

describe('the Content-Security-Policy in Chromium', () => {
  it('sends the headers with the HTML, and the test sees a violation when there is one', async () => {
    const { page, list } = await watchedPage()
    const response = await page.goto('/sign-in', { waitUntil: 'networkidle' })
    const headers = response!.headers()
    const csp = headers['content-security-policy']!
    expect(csp).toMatch(/frame-ancestors 'none'/)
    expect(csp).toMatch(/script-src 'self' 'strict-dynamic' 'nonce-[A-Za-z0-9+/=]{16,}'/)
    expect(csp).not.toMatch(/unsafe-eval/)
    expect(headers['x-content-type-options']).toBe('nosniff')
    expect(headers['referrer-policy']).toBe('strict-origin-when-cross-origin')
    expect(list).toEqual([])

    // The check itself: an image from elsewhere and an inline handler (a real click) are refused and reported.
    await page.evaluate(() => {
      const img = document.createElement('img')
      img.src = 'http://elsewhere.invalid/pixel.png'
      document.body.append(img)
      const button = document.createElement('button')
      button.id = 'csp-probe'
      button.textContent = 'probe'
      button.setAttribute('onclick', 'window.probeRan = true')
      document.body.prepend(button)
    })
    await page.click('#csp-probe')
    expect(await page.evaluate(() => (window as unknown as { probeRan?: boolean }).probeRan)).toBeUndefined()
    await expect.poll(() => list.join('\n')).toMatch(/img-src refused http:\/\/elsewhere\.invalid/)
    await expect.poll(() => list.join('\n')).toMatch(/script-src-attr refused inline/)
    await page.close()
  })

  it('keeps the app out of frames on other sites', async () => {
    const { page } = await watchedPage()
    await page.goto('about:blank')
    await page.setContent(`<iframe src="${MAIN_URL}/sign-in" width="600" height="400"></iframe>`)
    await page.waitForTimeout(1500)
    const frame = page.frames().find(f => f !== page.mainFrame())!
    // The framed page is replaced by the browser's error page: no sign-in form inside another site.
    expect(await frame.locator('input[type="password"]').count()).toBe(0)
    await page.close()
  })

  it('shows the signed-out pages without a violation', async () => {
    const { page, list } = await watchedPage()
    for (const path of ['/', '/sign-in', '/sign-up', '/forgot-password', '/reset-password?token=not-a-real-token',
      '/invitations/not-a-real-token', '/handovers/not-a-real-token', '/transfers/not-a-real-token']) {
      await visit(page, path)
    }
    // A refused sign-in runs the form's checks and shows the server's answer.
    await visit(page, '/sign-in')
    await page.getByLabel('E-mail').fill('nobody-here@example.com')
    await page.getByLabel('Password').fill('not the password')
    await page.getByTestId('sign-in-submit').click()
    await page.getByRole('alert').first().waitFor()
    expect(list).toEqual([])
    await page.close()
  })

  it('shows every page to the demo owner, keeper and vet without a violation', { timeout: 480_000 }, async () => {
    const { garden, fish } = await idsOf()
    for (const email of [OWNER, KEEPER, VET]) {
      const { page, list } = await watchedPage()
      await signIn(page, email, DEMO_PASSWORD)
      for (const path of signedInPages(garden, fish)) await visit(page, path)
      expect(list, email).toEqual([])
      await page.close()
    }
  })

  it('runs the growth and length–weight charts, the photo viewer, the uploader, the print button and the which-fish panel without a violation', { timeout: 240_000 }, async () => {
    const { garden, fish } = await idsOf()
    const { page, list } = await watchedPage()
    await signIn(page, OWNER, DEMO_PASSWORD)

    // The pond's length–weight chart, then "Which fish is this?" with a photo from the phone (a blob: preview).
    await visit(page, `/ponds/${garden}`)
    // Charts load when scrolled to, as a person would.
    await scrollThrough(page)
    await page.getByTestId('length-weight-chart').locator('canvas').waitFor()
    await page.evaluate(() => window.scrollTo(0, 0))
    const photo = join(files, 'at-the-pond.jpg')
    writeFileSync(photo, await makeKoiPhoto(5))
    await page.getByTestId('which-fish-open-panel').click()
    await page.getByTestId('which-fish-input').setInputFiles(photo)
    await page.locator('[data-testid="which-fish-candidates"], [data-testid="which-fish-none"], [data-testid="which-fish-reason"]').first().waitFor({ timeout: 120_000 })

    // The growth chart, the photo viewer with its large copy, and the uploader with a chosen photo's thumbnail.
    await visit(page, `/fish/${fish}`)
    await scrollThrough(page)
    await page.locator('[data-testid="growth-chart"] canvas').waitFor()
    await page.evaluate(() => window.scrollTo(0, 0))
    const tile = page.locator('[data-testid^="photo-"][data-state="ready"]').first()
    await tile.getByRole('button').first().click()
    const viewer = page.getByTestId('photo-viewer')
    await expect.poll(() => viewer.getByTestId('photo-large').evaluate(img => (img as HTMLImageElement).complete && (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)
    await viewer.getByTestId('photo-viewer-close').click()
    await page.getByTestId('add-photos').click()
    await page.locator('.uppy-Dashboard-inner').waitFor()
    await page.locator('input.uppy-Dashboard-input[type="file"]').first().setInputFiles(photo)
    await expect.poll(() => page.locator('.uppy-Dashboard-Item-previewImg').evaluate(img => (img as HTMLImageElement).src)).toMatch(/^(blob|data):/)

    // The printable record: the button reaches window.print (replaced here, so no dialog opens).
    await visit(page, `/fish/${fish}/record`)
    await countPrints(page)
    await page.getByRole('button', { name: 'Print or save as PDF' }).click({ timeout: 60_000 })
    await expect.poll(() => page.evaluate(() => (window as unknown as { printed: number }).printed)).toBe(1)
    expect(list).toEqual([])
    await page.close()
  })

  it('uploads a photo through the Dashboard, charts water tests and prints a visit summary without a violation', { timeout: 120_000 }, async () => {
    const { owner, keeper, vet, pond, fish } = await pondWithRoles()
    for (const [days, temperatureC] of [[3, 14.5], [1, 16]] as const) {
      const test = await keeper.client.post(`/api/ponds/${pond.id}/water-tests`, { testedAt: new Date(Date.now() - days * 86_400_000).toISOString(), temperatureC, pH: 7.6, tanMgL: 0.1 })
      expect(test.status, JSON.stringify(test.body)).toBe(201)
    }
    const opened = await vet.client.post(`/api/ponds/${pond.id}/visits`, { visitedOn: daysAgo(0), purpose: 'sick_call', fishSeen: [fish.id] })
    expect(opened.status, JSON.stringify(opened.body)).toBe(201)
    const visitId = opened.body.visit.id as string
    expect((await vet.client.post(`/api/ponds/${pond.id}/visits/${visitId}/close`, { findings: 'Gills clean; eating well.' })).status).toBe(200)

    const { page, list } = await watchedPage()
    await signIn(page, owner.email, owner.password)
    await visit(page, `/fish/${fish.id}`)
    await page.getByTestId('add-photos').click()
    await page.locator('.uppy-Dashboard-inner').waitFor()
    const photo = join(files, 'from-above.jpg')
    writeFileSync(photo, await makeKoiPhoto(9))
    await page.locator('input.uppy-Dashboard-input[type="file"]').first().setInputFiles(photo)
    await page.locator('.uppy-StatusBar-actionBtn--upload').click()
    await page.locator('.uppy-StatusBar.is-complete').waitFor({ timeout: 60_000 })
    await page.locator('[data-testid^="photo-"][data-state="ready"]').first().waitFor({ timeout: 30_000 })

    await visit(page, `/ponds/${pond.id}/water`)
    await scrollThrough(page)
    await page.getByTestId('water-chart-temperatureC').locator('canvas').waitFor()

    await visit(page, `/ponds/${pond.id}/visits/${visitId}`)
    await page.getByTestId('visit-summary').waitFor()
    await countPrints(page)
    await page.getByRole('button', { name: 'Print' }).click()
    await expect.poll(() => page.evaluate(() => (window as unknown as { printed: number }).printed)).toBe(1)
    expect(list).toEqual([])
    await page.close()
  })
})
