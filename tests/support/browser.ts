import { mkdtempSync, mkdirSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { chromium, type BrowserContext, type Page } from 'playwright-core'
import { afterAll, beforeAll } from 'vitest'
import { closeTestDb } from './db'
import { MAIN_URL, ROOT } from './env'

export const SCREENSHOT_DIR = resolve(ROOT, 'tests/screenshots')

// Debian's Chromium, without the background traffic this closed network refuses.
const CHROMIUM_ARGS = [
  '--headless=new', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage',
]

/** A fresh Chromium profile; `locale` and `timezoneId` stand for the person's browser settings (Accept-Language, time zone). */
export async function openBrowser(width = 1280, height = 900, settings: { locale?: string, timezoneId?: string } = {}): Promise<BrowserContext> {
  const profile = mkdtempSync(join(tmpdir(), 'fintrail-chromium-'))
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: CHROMIUM_ARGS,
    viewport: { width, height },
    baseURL: MAIN_URL,
    // A fixed reader by default (British English, UTC), so the dates the tests read do not depend on the machine.
    locale: 'en-GB',
    timezoneId: 'UTC',
    ...settings,
  })
  context.setDefaultTimeout(15_000)
  return context
}

/** Signs in on a clean slate: pages of one context share cookies, so whoever was signed in before is forgotten. */
export async function signIn(page: Page, email: string, password: string) {
  await page.context().clearCookies()
  await page.goto('/sign-in', { waitUntil: 'networkidle' })
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByTestId('sign-in-submit').click()
  await page.waitForURL(url => !url.pathname.startsWith('/sign-in'))
}

/** Saves the page at phone and desktop width into the git-ignored screenshot folder. */
export async function screenshots(page: Page, name: string) {
  mkdirSync(SCREENSHOT_DIR, { recursive: true })
  const original = page.viewportSize()
  for (const width of [390, 1280]) {
    await page.setViewportSize({ width, height: width === 390 ? 844 : 900 })
    await page.waitForTimeout(150)
    await page.screenshot({ path: join(SCREENSHOT_DIR, `${name}-${width}.png`), fullPage: true })
  }
  if (original) await page.setViewportSize(original)
}

/** Scrolls to the end of the page half a screen at a time, as a reader would, so parts that load when seen (charts) load. */
export async function scrollThrough(page: Page) {
  await page.evaluate(async () => {
    for (let y = 0; y <= document.documentElement.scrollHeight; y += window.innerHeight / 2) {
      window.scrollTo(0, y)
      await new Promise(done => setTimeout(done, 60))
    }
  })
}

/** One Chromium context for a test file, closed with the database pool when the file ends. */
export function browserForFile(width?: number, height?: number) {
  const holder = {} as { context: BrowserContext }
  beforeAll(async () => {
    holder.context = await openBrowser(width, height)
  })
  afterAll(async () => {
    await holder.context?.close()
    await closeTestDb()
  })
  return holder
}
