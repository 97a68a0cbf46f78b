import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { SCREENSHOT_DIR, openBrowser, screenshots, signIn } from '../support/browser'
import { closeTestDb } from '../support/db'
import { createFish, createPond, signedInUser } from '../support/factories'
import { MAIN_PORT, MAIN_URL } from '../support/env'
import { makeKoiPhoto, makeTwentyMegabyteJpeg, photoRows, tusUpload } from '../support/photos'
import { startServer, type RunningServer } from '../support/server'

let browser: BrowserContext
let files: string

beforeAll(async () => {
  browser = await openBrowser()
  files = mkdtempSync(join(tmpdir(), 'fintrail-photo-files-'))
})
afterAll(async () => {
  await browser?.close()
  rmSync(files, { recursive: true, force: true })
  await closeTestDb()
})

async function ownerWithFish(name: string) {
  const owner = await signedInUser({ name: 'Photo Owner' })
  const pond = await createPond(owner.client, { name: `Photo pond ${Date.now() % 100000}` })
  const fish = await createFish(owner.client, pond.id, { name })
  return { owner, pond, fish }
}

/** The large view is a modal over the viewport: a full-page capture would miss it. */
async function viewportShots(page: Page, name: string) {
  mkdirSync(SCREENSHOT_DIR, { recursive: true })
  for (const [width, height] of [[390, 844], [1280, 900]] as const) {
    await page.setViewportSize({ width, height })
    await page.waitForTimeout(300)
    await page.screenshot({ path: join(SCREENSHOT_DIR, `${name}-${width}.png`) })
  }
}

async function openUploader(page: Page) {
  await page.getByTestId('add-photos').click()
  await page.locator('.uppy-Dashboard-inner').waitFor()
}

/** Adds files through the Dashboard's own file input, as choosing them from the library does. */
async function addFiles(page: Page, paths: string[]) {
  await page.locator('input.uppy-Dashboard-input[type="file"]').first().setInputFiles(paths)
}

describe('photos on a fish profile, in Chromium', () => {
  it('adds a photo through the Dashboard: progress finishes, the thumbnail appears in the gallery and on the card', async () => {
    const { owner, pond, fish } = await ownerWithFish('Hoshi')
    const path = join(files, 'hoshi-from-above.jpg')
    writeFileSync(path, await makeKoiPhoto(7, { width: 3000, height: 2250, takenAt: '2025:04:20 10:15:00' }))
    const page = await browser.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('photo-gallery').waitFor()
    await openUploader(page)
    await addFiles(page, [path])
    await page.locator('.uppy-Dashboard-Item').waitFor()
    for (const width of [390, 1280]) {
      await page.setViewportSize({ width, height: 900 })
      await page.waitForTimeout(200)
      await page.getByTestId('photo-uploader').screenshot({ path: join(SCREENSHOT_DIR, `fish-photo-uploader-${width}.png`) })
    }
    await page.locator('.uppy-StatusBar-actionBtn--upload').click()
    await page.locator('.uppy-StatusBar.is-complete').waitFor({ timeout: 30_000 })
    const tile = page.locator('[data-testid^="photo-"][data-state="ready"]').first()
    await tile.waitFor()
    await expect.poll(() => tile.getByTestId('photo-thumb').evaluate(img => (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)
    await expect.poll(() => tile.textContent()).toContain('Taken 20 Apr 2025')
    await expect.poll(() => tile.textContent()).toContain('Profile picture')
    // The first photo became the profile picture at the top of the profile.
    const portrait = page.locator(`img[alt="Photo of Hoshi"]`)
    await expect.poll(() => portrait.evaluate(img => (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)
    const [row] = await photoRows('fish_id = $1', [fish.id])
    expect(row!.state).toBe('ready')

    // The large view, with its view and caption.
    await tile.getByRole('button').first().click()
    const viewer = page.getByTestId('photo-viewer')
    // A screen-sized copy, not the 320 px thumbnail.
    await expect.poll(() => viewer.getByTestId('photo-large').evaluate(img => (img as HTMLImageElement).complete && (img as HTMLImageElement).currentSrc)).toMatch(/\/(1024|2048)\.webp$/)
    await viewer.getByLabel('Caption').fill('Tancho spot slightly left of centre')
    await viewer.getByRole('button', { name: 'Save view and caption' }).click()
    await expect.poll(async () => (await photoRows('fish_id = $1', [fish.id]))[0]!.caption).toBe('Tancho spot slightly left of centre')
    await viewportShots(page, 'fish-photo-viewer')
    await viewer.getByTestId('photo-viewer-close').click()

    // Two more, from a keeper's phone at other times, for the gallery as it usually looks.
    for (const [seed, view, takenAt] of [[11, 'left', '2024:09:02 16:40:00'], [23, 'top', '2023:05:14 08:05:00']] as const) {
      const result = await tusUpload(MAIN_URL, owner.client, await makeKoiPhoto(seed, { takenAt }), { metadata: { fishId: fish.id, filename: `${seed}.jpg`, view } }).done
      expect(result.headers['photo-state']).toBe('ready')
    }
    await page.reload()
    await expect.poll(() => page.locator('[data-testid^="photo-"][data-state="ready"]').count()).toBe(3)
    // Thumbnails load lazily, once the gallery is on screen.
    await page.getByTestId('photo-grid').scrollIntoViewIfNeeded()
    await expect.poll(() => page.locator('[data-testid="photo-thumb"]').evaluateAll(imgs => imgs.every(img => (img as HTMLImageElement).complete && (img as HTMLImageElement).naturalWidth > 0))).toBe(true)
    await screenshots(page, 'fish-photos')

    await page.goto(`/ponds/${pond.id}`, { waitUntil: 'networkidle' })
    const card = page.getByTestId('fish-card-Hoshi').locator('img')
    await expect.poll(() => card.getAttribute('src')).toBe(`/api/photos/${row!.id}/320.webp`)
    await expect.poll(() => card.evaluate(img => (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0)
    await page.close()
  })

  it('shows a photo whose sizes are still being made as processing, and the picture once a worker made them', async () => {
    // A web instance that answers at once and leaves photo work to others, with a job queue of its own: the sizes
    // are made only once a worker instance on that queue starts, so the page first sees the photo pending.
    const queue = { NUXT_JOBS_SCHEMA: 'pgboss_preparing', NUXT_PHOTO_RECOVERY_INTERVAL_SECONDS: '0' }
    const servers: RunningServer[] = []
    try {
      const web = await startServer(MAIN_PORT + 8, { ...queue, NUXT_PHOTO_DERIVE_WORKERS: '0', NUXT_PHOTO_FINISH_WAIT_SECONDS: '0' })
      servers.push(web)
      const { owner, fish } = await ownerWithFish('Kumo')
      const path = join(files, 'kumo-from-above.jpg')
      writeFileSync(path, await makeKoiPhoto(43, { width: 2400, height: 1800 }))
      const page = await browser.newPage()
      // The session cookie of 127.0.0.1 is sent to every port: signed in on one instance, signed in on the other.
      await signIn(page, owner.email, owner.password)
      const answers: string[] = []
      page.on('response', (response) => {
        if (response.url().includes('/api/uploads/') && response.request().method() === 'PATCH') answers.push(response.headers()['photo-state'] ?? '')
      })
      await page.goto(`${web.url}/fish/${fish.id}`, { waitUntil: 'networkidle' })
      await openUploader(page)
      await addFiles(page, [path])
      await page.locator('.uppy-StatusBar-actionBtn--upload').click()
      await page.locator('.uppy-StatusBar.is-complete').waitFor({ timeout: 30_000 })
      expect(answers.at(-1)).toBe('pending')
      await page.locator('.uppy-StatusBar-actionBtn--done').click()
      const tile = page.locator('[data-testid^="photo-"][data-state]').first()
      await expect.poll(() => tile.getAttribute('data-state'), { timeout: 15_000 }).toBe('pending')
      expect(await tile.getByTestId('photo-pending').textContent()).toMatch(/Processing/)
      expect(await page.getByTestId('reference-photo-count').textContent()).toMatch(/being prepared/)
      await screenshots(page, 'fish-photo-processing')

      servers.push(await startServer(MAIN_PORT + 9, queue))
      // No reload: the gallery looks again by itself while a photo is pending.
      await expect.poll(() => tile.getAttribute('data-state'), { timeout: 60_000 }).toBe('ready')
      await expect.poll(() => tile.getByTestId('photo-thumb').evaluate(img => (img as HTMLImageElement).naturalWidth), { timeout: 15_000 }).toBeGreaterThan(0)
      // It became the profile picture when it was ready: the portrait at the top shows it, still without a reload.
      await expect.poll(() => page.locator('img[alt="Photo of Kumo"]').evaluate(img => (img as HTMLImageElement).naturalWidth), { timeout: 15_000 }).toBeGreaterThan(0)
      await expect.poll(() => page.getByTestId('reference-photo-count').textContent()).toMatch(/1 photo from above/)
      const rows = await photoRows('fish_id = $1', [fish.id])
      expect(rows.map(row => row.state)).toEqual(['ready'])
      await page.close()
    }
    finally {
      for (const server of servers) await server.stop()
    }
  }, 180_000)

  it('says a photo added twice is already in the gallery, and stores it once', async () => {
    const { owner, fish } = await ownerWithFish('Yuki')
    const path = join(files, 'yuki-twice.jpg')
    const bytes = await makeKoiPhoto(31, { width: 1200, height: 900 })
    writeFileSync(path, bytes)
    const first = await tusUpload(MAIN_URL, owner.client, bytes, { metadata: { fishId: fish.id, filename: 'yuki-first.jpg', view: 'top' } }).done
    expect(first.headers['photo-state']).toBe('ready')
    const page = await browser.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await openUploader(page)
    await addFiles(page, [path])
    await page.locator('.uppy-StatusBar-actionBtn--upload').click()
    await expect.poll(() => page.getByTestId('upload-already-there').textContent(), { timeout: 30_000 }).toMatch(/yuki-twice\.jpg\s+is already in the gallery/)
    // The file leaves the uploader's list, so nothing there reads "complete" for it.
    await expect.poll(() => page.locator('.uppy-Dashboard-Item').count()).toBe(0)
    expect(await photoRows('fish_id = $1', [fish.id])).toHaveLength(1)
    await page.getByTestId('photo-uploader').screenshot({ path: join(SCREENSHOT_DIR, 'fish-photo-already-there-1280.png') })
    await page.close()
  })

  it('keeps the fish\'s head in view: tapping it on a portrait photo sets where the picture is cropped', async () => {
    const { owner, pond, fish } = await ownerWithFish('Kaze')
    const portrait = await tusUpload(MAIN_URL, owner.client, await makeKoiPhoto(5, { width: 900, height: 1600 }), { metadata: { fishId: fish.id, filename: 'kaze-tall.jpg', view: 'top' } }).done
    expect(portrait.headers['photo-state']).toBe('ready')
    const page = await browser.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('portrait-focus-open').click()
    const photo = page.getByTestId('portrait-focus-photo')
    await photo.locator('img').evaluate(img => (img as HTMLImageElement).decode())
    const box = (await photo.boundingBox())!
    await page.mouse.click(box.x + box.width * 0.5, box.y + box.height * 0.2)
    await screenshots(page, 'fish-portrait-focus')
    await page.getByTestId('portrait-focus-save').click()
    const profileImage = page.locator('img[alt="Photo of Kaze"]').first()
    await expect.poll(() => profileImage.evaluate(img => getComputedStyle(img).objectPosition)).toBe('50% 20%')
    await page.goto(`/ponds/${pond.id}`, { waitUntil: 'networkidle' })
    await expect.poll(() => page.getByTestId('fish-card-Kaze').locator('img').evaluate(img => getComputedStyle(img).objectPosition)).toBe('50% 20%')
    await page.close()
  })

  it('shows the server\'s own reason when a file is refused', async () => {
    const { owner, fish } = await ownerWithFish('Kumo')
    const path = join(files, 'not-really.jpg')
    writeFileSync(path, 'This is a note, not a photo.\n')
    const page = await browser.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await openUploader(page)
    await addFiles(page, [path])
    await page.locator('.uppy-StatusBar-actionBtn--upload').click()
    await expect.poll(() => page.getByTestId('upload-problem').textContent(), { timeout: 20_000 }).toMatch(/not-really\.jpg:.*holds text, not a photo/)
    expect(await photoRows('fish_id = $1', [fish.id])).toEqual([])
    await page.close()
  })

  it('continues an interrupted upload after the page is reloaded and the same photo is added again', async () => {
    const { owner, fish } = await ownerWithFish('Ryu')
    const path = join(files, 'ryu-large.jpg')
    writeFileSync(path, await makeTwentyMegabyteJpeg())
    const page = await browser.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await openUploader(page)
    // The signal goes after the first 5 MB chunk: every later PATCH fails at the network level.
    let patches = 0
    await page.route('**/api/uploads/*', async (route) => {
      if (route.request().method() === 'PATCH' && ++patches > 1) return route.abort('internetdisconnected')
      return route.continue()
    })
    await addFiles(page, [path])
    await page.locator('.uppy-StatusBar-actionBtn--upload').click()
    await expect.poll(() => patches, { timeout: 20_000 }).toBeGreaterThan(1)

    const offsets: string[] = []
    const creations: string[] = []
    page.on('request', (request) => {
      if (request.url().includes('/api/uploads') && request.method() === 'PATCH') offsets.push(request.headers()['upload-offset'] ?? '')
      if (request.url().endsWith('/api/uploads') && request.method() === 'POST') creations.push(request.url())
    })
    await page.reload()
    // The signal is back only now: no retry of the old page slipped through before the reload.
    await page.unroute('**/api/uploads/*')
    await openUploader(page)
    await addFiles(page, [path])
    await page.locator('.uppy-StatusBar-actionBtn--upload').click()
    await page.locator('.uppy-StatusBar.is-complete').waitFor({ timeout: 60_000 })
    // No new upload was created: the first PATCH after the reload starts where the server stood.
    expect(creations).toEqual([])
    expect(offsets[0]).toBe(String(5 * 1024 * 1024))
    const rows = await photoRows('fish_id = $1', [fish.id])
    expect(rows).toHaveLength(1)
    expect(rows[0]!.state).toBe('ready')
    await page.close()
  })
})
