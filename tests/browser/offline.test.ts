import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { BrowserContext, Page } from 'playwright-core'
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { testDb } from '../support/db'
import { addMember, createFish, createPond, signedInUser } from '../support/factories'
import { MAIN_URL } from '../support/env'
import { makeJpeg, makeKoiPhoto, sha256, tusUpload } from '../support/photos'
import { addEntry, daysAgo } from '../support/timeline'
import { UPLOAD_CHUNK_BYTES } from '../../shared/utils/photo-limits'

// Offline at the pond side, in Chromium with the network switched off through the browser context
// (context.setOffline): the service worker starts the app, the device's kept answers show the fish, new entries
// wait in the outbox (IndexedDB) and are sent once when the network is back. One browser for the whole file.

const chromium = browserForFile()
let browser: BrowserContext
let files: string

beforeAll(() => {
  browser = chromium.context
  files = mkdtempSync(join(tmpdir(), 'fintrail-offline-'))
})
afterAll(() => {
  rmSync(files, { recursive: true, force: true })
})
// One browser for the file: a test that fails must not leave the next one without a network, nor a page of its own
// whose outbox would keep sending alongside the next test's.
const openPages: Page[] = []
async function openPage() {
  const page = await browser.newPage()
  openPages.push(page)
  return page
}
afterEach(async () => {
  for (const page of openPages.splice(0)) await page.close().catch(() => {})
  await browser.setOffline(false)
})

/** The service worker controls the page and has the shell; the fish's answers are kept on the device. */
async function readyForOffline(page: Page, fishId: string) {
  await page.waitForFunction(() => navigator.serviceWorker.controller !== null, undefined, { timeout: 30_000 })
  await page.waitForFunction(async () => Boolean(await caches.match('/offline-shell')), undefined, { timeout: 30_000 })
  await expect.poll(() => keptKeys(page), { timeout: 10_000 }).toEqual(expect.arrayContaining([
    `/api/fish/${fishId}`, `/api/fish/${fishId}/facts`, expect.stringMatching(new RegExp(`^/api/fish/${fishId}/timeline(\\?limit=\\d+)?$`)), '/api/me',
  ]))
}

/** Reads the device database without creating it (opening a missing one would make an empty one). */
async function deviceStore(page: Page, store: 'saved' | 'outbox' | 'photos'): Promise<unknown[]> {
  return page.evaluate(async (storeName) => {
    const account = localStorage.getItem('fintrail-account')
    const name = `fintrail-${account}`
    if (!account || !(await indexedDB.databases()).some(d => d.name === name)) return []
    return new Promise<unknown[]>((resolve, reject) => {
      const open = indexedDB.open(name)
      open.onerror = () => reject(open.error)
      open.onsuccess = () => {
        const db = open.result
        const request = db.transaction(storeName).objectStore(storeName).getAll()
        request.onsuccess = () => {
          db.close()
          resolve((request.result as { file?: unknown, image?: Blob }[]).map(({ file: _file, image, ...rest }) => (image ? { ...rest, imageType: image.type, imageBytes: image.size } : rest)))
        }
        request.onerror = () => reject(request.error)
      }
    })
  }, store)
}

async function keptKeys(page: Page) {
  return (await deviceStore(page, 'saved') as { key: string }[]).map(row => row.key)
}

async function countRows(sql: string, params: unknown[]) {
  const { rows } = await testDb().query<{ n: string }>(sql, params)
  return Number(rows[0]!.n)
}

async function addWeight(page: Page, kg: string, cm: string) {
  await page.getByTestId('add-measurement').click()
  const form = page.getByTestId('entry-form')
  await form.getByLabel('Weight', { exact: true }).fill(kg)
  await form.getByTestId('weight-unit-kg').click()
  await form.getByLabel('Length (cm)').fill(cm)
  await form.getByTestId('entry-submit').click()
  await form.waitFor({ state: 'detached' })
}

async function addObservation(page: Page, text: string) {
  await page.getByTestId('add-observation').click()
  const form = page.getByTestId('entry-form')
  await form.getByLabel('What you saw').fill(text)
  await form.getByTestId('entry-submit').click()
  await form.waitFor({ state: 'detached' })
}

describe('offline at the pond side, in Chromium', () => {
  it('opens a fish with no network, keeps a weight, an observation and a photo, and sends each exactly once when back online', async () => {
    const owner = await signedInUser({ name: 'Offline Owner' })
    const pond = await createPond(owner.client, { name: 'Cellar pond' })
    const fish = await createFish(owner.client, pond.id, { name: 'Mizu' })
    await addEntry(owner.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(20), data: { weightG: 1250, lengthCm: 42, lengthType: 'total' } })
    const photoPath = join(files, 'mizu-from-above.jpg')
    writeFileSync(photoPath, await makeKoiPhoto(11, { width: 1200, height: 900 }))

    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`)
    await readyForOffline(page, fish.id)

    await browser.setOffline(true)
    await page.reload()
    // The shell from the service worker, the fish from what the device kept.
    await page.getByTestId('offline-banner').waitFor()
    expect(await page.getByTestId('offline-banner').textContent()).toMatch(/offline — showing what was saved on this device at \d\d:\d\d/)
    expect(await page.getByTestId('fish-name').textContent()).toBe('Mizu')
    expect(await page.getByTestId('entry-measurement').count()).toBe(1)

    await addWeight(page, '1.3', '43')
    await addObservation(page, 'Rubbing on the pond wall after the storm')
    await page.getByTestId('add-photos').click()
    await page.getByTestId('photo-offline-input').setInputFiles(photoPath)
    await page.getByTestId('waiting-photo').waitFor()
    for (const kind of ['measurement', 'observation', 'photo']) {
      expect(await page.getByTestId(`waiting-${kind}`).getByTestId('waiting-state').textContent()).toBe('waiting to send')
    }
    expect(await page.getByTestId('outbox-count').textContent()).toBe('3')
    expect(await deviceStore(page, 'outbox')).toHaveLength(3)
    // Nothing reached the server while offline.
    expect(await countRows('select count(*) n from timeline_entries where fish_id = $1', [fish.id])).toBe(1)
    // From the top: the banner under the header, the waiting entries further down the full-page capture.
    await page.evaluate(() => window.scrollTo(0, 0))
    await screenshots(page, 'offline-fish-waiting')
    await page.getByTestId('nav-outbox').click()
    await page.getByRole('heading', { name: 'Outbox' }).waitFor()
    await screenshots(page, 'offline-outbox')
    await page.goBack()
    await page.getByTestId('timeline-waiting').waitFor()

    await browser.setOffline(false)
    // Sent by itself: the waiting list empties and the record shows the entries as ordinary (sent) ones.
    // The photo is processed (sharp) before its upload answers: on a busy machine that takes a while.
    await page.getByTestId('timeline-waiting').waitFor({ state: 'detached', timeout: 60_000 })
    await expect.poll(() => page.getByTestId('entry-measurement').count(), { timeout: 30_000 }).toBe(2)
    expect(await page.getByTestId('entry-observation').textContent()).toContain('Rubbing on the pond wall after the storm')
    expect(await page.getByTestId('nav-outbox').count()).toBe(0)
    expect(await page.getByTestId('offline-banner').count()).toBe(0)
    expect(await deviceStore(page, 'outbox')).toHaveLength(0)

    expect(await countRows('select count(*) n from timeline_entries where fish_id = $1 and kind = \'measurement\'', [fish.id])).toBe(2)
    expect(await countRows('select count(*) n from timeline_entries where fish_id = $1 and kind = \'observation\'', [fish.id])).toBe(1)
    expect(await countRows('select count(*) n from photos where fish_id = $1', [fish.id])).toBe(1)
    const { rows: [weight] } = await testDb().query<{ data: { weightG: number, lengthCm: number } }>(
      'select data from timeline_entries where fish_id = $1 and kind = \'measurement\' order by created_at desc limit 1', [fish.id])
    expect(weight!.data.weightG).toBe(1300)
    expect(weight!.data.lengthCm).toBe(43)
    await page.close()
  }, 150_000)

  it('sends again after the answer to a send was lost, and the server keeps the entry once', async () => {
    const owner = await signedInUser({ name: 'Lost Answer Owner' })
    const pond = await createPond(owner.client, { name: 'Orchard pond' })
    const fish = await createFish(owner.client, pond.id, { name: 'Kaze' })
    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`)
    await page.getByTestId('fish-name').waitFor()

    // The first send reaches the server, which writes the entry; its answer is then dropped on the way back.
    const posts: string[] = []
    await page.route(`**/api/fish/${fish.id}/timeline`, async (route) => {
      if (route.request().method() !== 'POST') return route.continue()
      posts.push(route.request().postData() ?? '')
      if (posts.length > 1) return route.continue()
      const answer = await route.fetch()
      expect(answer.status()).toBe(201)
      await route.abort('connectionreset')
    })
    await addObservation(page, 'Fins clamped in the morning, eating by noon')
    await page.getByTestId('entry-observation').waitFor({ timeout: 30_000 })
    await page.getByTestId('timeline-waiting').waitFor({ state: 'detached' })

    // Two sends of the same device-made id, one entry.
    expect(posts).toHaveLength(2)
    expect(JSON.parse(posts[0]!).id).toBe(JSON.parse(posts[1]!).id)
    expect(await countRows('select count(*) n from timeline_entries where fish_id = $1 and kind = \'observation\'', [fish.id])).toBe(1)
    expect(await page.getByTestId('entry-observation').count()).toBe(1)
    await page.close()
  })

  it('keeps an entry the server refused because the role was removed while offline, with the reason, to copy or discard', async () => {
    const owner = await signedInUser({ name: 'Pond Owner' })
    const keeper = await signedInUser({ name: 'Removed Keeper' })
    const pond = await createPond(owner.client, { name: 'Allotment pond' })
    await addMember(pond.id, keeper.user.id, 'keeper')
    const fish = await createFish(owner.client, pond.id, { name: 'Tora' })
    const page = await openPage()
    await signIn(page, keeper.email, keeper.password)
    await page.goto(`/fish/${fish.id}`)
    await readyForOffline(page, fish.id)

    await browser.setOffline(true)
    await addWeight(page, '0.9', '35')
    await page.getByTestId('waiting-measurement').waitFor()
    expect((await owner.client.request('DELETE', `/api/ponds/${pond.id}/members/${keeper.user.id}`)).status).toBe(200)
    await browser.setOffline(false)

    await expect.poll(() => page.getByTestId('waiting-measurement').getByTestId('waiting-state').textContent(), { timeout: 30_000 }).toBe('not sent')
    await page.getByTestId('nav-outbox').click()
    const item = page.locator('[data-testid^="outbox-item-"]')
    await item.getByTestId('outbox-reason').waitFor()
    expect(await item.getByTestId('outbox-reason').textContent()).toContain('no longer be a member')
    expect(await page.getByTestId('outbox-count').textContent()).toBe('1')
    const [kept] = await deviceStore(page, 'outbox') as { state: string, status: number, body: { data: { weightG: number } } }[]
    expect(kept).toMatchObject({ state: 'failed', status: 404, body: { data: { weightG: 900 } } })
    expect(await countRows('select count(*) n from timeline_entries where fish_id = $1', [fish.id])).toBe(0)

    // Copy puts the entry in words on the clipboard, to record it another way.
    await browser.grantPermissions(['clipboard-read', 'clipboard-write'])
    await item.getByTestId('outbox-copy').click()
    await item.getByText('Copied').waitFor()
    const copied = await page.evaluate(() => navigator.clipboard.readText())
    expect(copied).toContain('Weight & length · Tora')
    expect(copied).toContain('"weightG": 900')
    await screenshots(page, 'offline-outbox-refused')
    await item.getByTestId('outbox-discard').click()
    await item.getByTestId('outbox-discard-confirm').click()
    await item.waitFor({ state: 'detached' })
    expect(await deviceStore(page, 'outbox')).toHaveLength(0)
    await page.close()
  })

  it('shows both versions when a profile edit went stale (409), and keeps the person\'s own on request', async () => {
    const owner = await signedInUser({ name: 'Stale Editor' })
    const pond = await createPond(owner.client, { name: 'Terrace pond' })
    const fish = await createFish(owner.client, pond.id, { name: 'Sora', variety: 'Showa' })
    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}/edit`)
    await page.getByLabel('Variety').fill('Sanke')
    // Someone else saves in between (here the same owner from another device).
    expect((await owner.client.request('PATCH', `/api/fish/${fish.id}`, { body: { version: fish.version, variety: 'Kohaku' } })).status).toBe(200)
    await page.getByRole('button', { name: 'Save changes' }).click()
    const conflict = page.getByTestId('edit-conflict')
    await conflict.waitFor()
    expect(await conflict.getByTestId('conflict-variety').textContent()).toMatch(/Variety\s*Sanke\s*Kohaku/)
    await conflict.getByTestId('conflict-keep-mine').click()
    await page.waitForURL(url => url.pathname === `/fish/${fish.id}`)
    const { rows: [row] } = await testDb().query<{ variety: string, version: number }>('select variety, version from fish where id = $1', [fish.id])
    expect(row).toEqual({ variety: 'Sanke', version: fish.version + 2 })
    await page.close()
  })

  it('resumes a queued photo from the server\'s offset when the connection drops again half-way, and keeps it once', async () => {
    const owner = await signedInUser({ name: 'Resuming Owner' })
    const pond = await createPond(owner.client, { name: 'Barn pond' })
    const fish = await createFish(owner.client, pond.id, { name: 'Nami' })
    // Incompressible noise: about 10 MB, so three tus parts of UPLOAD_CHUNK_BYTES (5 MB).
    const bytes = await makeJpeg({ width: 2200, height: 1700, quality: 100, sigma: 80 })
    expect(bytes.length).toBeGreaterThan(2 * UPLOAD_CHUNK_BYTES)
    const photoPath = join(files, 'nami-large.jpg')
    writeFileSync(photoPath, bytes)

    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`)
    await readyForOffline(page, fish.id)
    await browser.setOffline(true)
    await page.getByTestId('add-photos').click()
    await page.getByTestId('photo-offline-input').setInputFiles(photoPath)
    await page.getByTestId('waiting-photo').waitFor()

    // Every part sent, and the offset the server reports when the upload is resumed; the second part never arrives:
    // the connection drops as it goes out.
    const parts: { offset: number, bytes: number, delivered: boolean }[] = []
    const resumedAt: number[] = []
    await page.route('**/api/uploads/**', async (route) => {
      const request = route.request()
      if (request.method() === 'PATCH') {
        const part = { offset: Number(request.headers()['upload-offset']), bytes: request.postDataBuffer()?.length ?? -1, delivered: true }
        parts.push(part)
        if (part.offset > 0 && parts.filter(p => !p.delivered).length === 0) {
          part.delivered = false
          await browser.setOffline(true)
          return route.abort('internetdisconnected')
        }
        return route.continue()
      }
      if (request.method() === 'HEAD') {
        const response = await route.fetch()
        resumedAt.push(Number(response.headers()['upload-offset']))
        return route.fulfill({ response })
      }
      return route.continue()
    })
    await browser.setOffline(false)
    await expect.poll(() => parts.some(p => !p.delivered), { timeout: 60_000 }).toBe(true)
    // Cut off half-way: the photo waits with its upload address, nothing is finished on the server.
    await expect.poll(async () => (await deviceStore(page, 'outbox'))[0]).toMatchObject({ type: 'photo', state: 'waiting', uploadUrl: expect.stringContaining('/api/uploads/') })
    expect(await countRows('select count(*) n from photos where fish_id = $1', [fish.id])).toBe(0)

    await browser.setOffline(false)
    await page.getByTestId('timeline-waiting').waitFor({ state: 'detached', timeout: 90_000 })
    // It asked the server how far the bytes got and went on from there: the first part was not sent again.
    expect(resumedAt).toEqual([UPLOAD_CHUNK_BYTES])
    const delivered = parts.filter(p => p.delivered)
    expect(delivered.map(p => p.offset)).toEqual([0, UPLOAD_CHUNK_BYTES, 2 * UPLOAD_CHUNK_BYTES])
    const sentBytes = parts.reduce((sum, p) => sum + p.bytes, 0)
    expect(delivered.reduce((sum, p) => sum + p.bytes, 0)).toBe(bytes.length)
    expect(sentBytes).toBeLessThan(2 * bytes.length)
    const { rows } = await testDb().query<{ sha256: string }>('select sha256 from photos where fish_id = $1', [fish.id])
    expect(rows).toEqual([{ sha256: sha256(bytes) }])
    expect(await deviceStore(page, 'outbox')).toHaveLength(0)
    await page.unroute('**/api/uploads/**')
    await page.close()
  }, 180_000)

  it('queues a dose ticked off offline, shows it waiting on the course, and sends it once and in order', async () => {
    const owner = await signedInUser({ name: 'Dosing Owner' })
    const vet = await signedInUser({ name: 'Course Vet' })
    const pond = await createPond(owner.client, { name: 'Greenhouse pond' })
    await addMember(pond.id, vet.user.id, 'vet')
    const fish = await createFish(owner.client, pond.id, { name: 'Hoshi' })
    const { entry } = await addEntry(vet.client, fish.id, {
      kind: 'treatment', occurredAt: daysAgo(0),
      data: {
        drug: 'Enrofloxacin', route: 'injection', injectionSite: 'Intramuscular, below the dorsal fin', dose: 10, doseUnit: 'mg/kg',
        startOn: daysAgo(0), doseCount: 3, intervalHours: 48, firstDoseAt: new Date(Date.now() - 3_600_000).toISOString(),
      },
    })
    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`)
    await readyForOffline(page, fish.id)
    await page.getByTestId('dose-given-1').waitFor()

    await browser.setOffline(true)
    const tickedBefore = new Date()
    await page.getByTestId('dose-given-1').click()
    const dose = page.getByTestId('dose-1')
    await dose.getByTestId('dose-waiting').waitFor()
    expect(await dose.getByTestId('dose-waiting').textContent()).toBe('waiting to send')
    expect(await page.getByTestId('dose-given-1').count()).toBe(0)
    await addObservation(page, 'Ate well after the injection')
    expect(await page.getByTestId('outbox-count').textContent()).toBe('2')
    const queued = await deviceStore(page, 'outbox') as { type: string, seq: number, body: { id: string, doseNumber?: number, givenAt?: string } }[]
    const [doseItem, observationItem] = queued.sort((a, b) => a.seq - b.seq)
    expect(doseItem).toMatchObject({ type: 'dose', body: { doseNumber: 1 } })
    expect(observationItem!.type).toBe('entry')
    // The dose keeps the moment it was ticked, not the moment it is sent.
    expect(Date.parse(doseItem!.body.givenAt!)).toBeGreaterThanOrEqual(tickedBefore.getTime() - 1_000)
    await page.reload()
    await page.getByTestId('dose-1').getByTestId('dose-waiting').waitFor()
    expect(await countRows('select count(*) n from treatment_doses where entry_id = $1', [entry.id])).toBe(0)
    await screenshots(page, 'offline-dose-waiting')

    // Back online the first send of the dose reaches the server but its answer is lost: the retry does not double it.
    const dosePosts: string[] = []
    await page.route(`**/api/timeline/${entry.id}/doses`, async (route) => {
      if (route.request().method() !== 'POST') return route.continue()
      dosePosts.push(route.request().postData() ?? '')
      if (dosePosts.length > 1) return route.continue()
      const answer = await route.fetch()
      expect(answer.status()).toBe(201)
      await route.abort('connectionreset')
    })
    const onlineAt = new Date()
    await browser.setOffline(false)
    await expect.poll(() => page.getByTestId('dose-1').getAttribute('data-state'), { timeout: 60_000 }).toBe('given')
    await page.getByTestId('timeline-waiting').waitFor({ state: 'detached', timeout: 30_000 })
    expect(await page.getByTestId('dose-1').getByTestId('dose-waiting').count()).toBe(0)
    expect(dosePosts.length).toBeGreaterThanOrEqual(2)
    expect(new Set(dosePosts.map(post => JSON.parse(post).id)).size).toBe(1)
    const { rows: doses } = await testDb().query<{ id: string, given_at: Date, given_by_id: string, created_at: Date }>(
      'select id, given_at, given_by_id, created_at from treatment_doses where entry_id = $1', [entry.id])
    expect(doses).toHaveLength(1)
    expect(doses[0]).toMatchObject({ id: doseItem!.body.id, given_by_id: owner.user.id })
    expect(doses[0]!.given_at.getTime()).toBeLessThan(onlineAt.getTime())
    // Sent in the order written: the dose before the observation written after it.
    const { rows: [observation] } = await testDb().query<{ created_at: Date }>('select created_at from timeline_entries where fish_id = $1 and kind = \'observation\'', [fish.id])
    expect(doses[0]!.created_at.getTime()).toBeLessThanOrEqual(observation!.created_at.getTime())
    await page.unroute(`**/api/timeline/${entry.id}/doses`)
    await page.close()
  }, 150_000)

  it('shows the profile picture, the gallery and the growth chart of a fish opened before, with no network', async () => {
    const owner = await signedInUser({ name: 'Chart Owner' })
    const pond = await createPond(owner.client, { name: 'Meadow pond' })
    const fish = await createFish(owner.client, pond.id, { name: 'Kumo' })
    await addEntry(owner.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(60), data: { weightG: 800, lengthCm: 36, lengthType: 'total' } })
    await addEntry(owner.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(10), data: { weightG: 950, lengthCm: 38, lengthType: 'total' } })
    const upload = await tusUpload(MAIN_URL, owner.client, await makeKoiPhoto(23), { metadata: { fishId: fish.id, filename: 'kumo.jpg', view: 'top' } }).done
    const photoId = upload.headers['photo-id']
    expect(photoId).toBeTruthy()
    // Derived sizes may be made in the background: the picture is chosen once it is ready.
    await expect.poll(async () => (await testDb().query('select state from photos where id = $1', [photoId])).rows[0]?.state, { timeout: 60_000 }).toBe('ready')
    expect((await owner.client.post(`/api/fish/${fish.id}/profile-photo`, { photoId })).status).toBe(200)

    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`)
    await readyForOffline(page, fish.id)
    await page.getByTestId(`photo-${photoId}`).scrollIntoViewIfNeeded()
    // Kept without scrolling to the chart: the growth answer is fetched once the page is idle.
    await expect.poll(() => keptKeys(page), { timeout: 15_000 }).toContain(`/api/fish/${fish.id}/growth`)
    await expect.poll(async () => (await deviceStore(page, 'photos') as { photoId: string, imageType: string, imageBytes: number }[]).map(p => p.photoId), { timeout: 15_000 }).toEqual([photoId])
    const [kept] = await deviceStore(page, 'photos') as { imageType: string, imageBytes: number }[]
    expect(kept!.imageType).toMatch(/^image\/(webp|jpeg)$/)
    expect(kept!.imageBytes).toBeGreaterThan(1000)

    await browser.setOffline(true)
    await page.reload()
    await page.getByTestId('offline-banner').waitFor()
    const portrait = page.getByTestId('fish-portrait')
    await expect.poll(() => portrait.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0 && img.currentSrc.startsWith('blob:')), { timeout: 10_000 }).toBe(true)
    const thumb = page.getByTestId(`photo-${photoId}`).getByTestId('photo-thumb')
    await thumb.scrollIntoViewIfNeeded()
    await expect.poll(() => thumb.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0 && img.currentSrc.startsWith('blob:')), { timeout: 10_000 }).toBe(true)

    await page.getByRole('heading', { name: 'Growth and condition' }).scrollIntoViewIfNeeded()
    const chart = page.getByTestId('growth-chart')
    await chart.waitFor({ timeout: 15_000 })
    expect(await chart.locator('canvas').getAttribute('aria-label')).toContain('2 measurements')
    // Drawn: the canvas holds painted pixels, not an empty box.
    await expect.poll(() => chart.locator('canvas').evaluate((canvas: HTMLCanvasElement) => {
      const { data } = canvas.getContext('2d')!.getImageData(0, 0, canvas.width, canvas.height)
      let painted = 0
      for (let i = 3; i < data.length; i += 4) if (data[i]! > 0) painted += 1
      return painted
    }), { timeout: 10_000 }).toBeGreaterThan(1000)
    await screenshots(page, 'offline-fish-photos-growth')
    await browser.setOffline(false)
    await page.close()
  }, 150_000)

  it('refuses a profile edit with no connection, plainly, changing nothing, and saves it once back online', async () => {
    const owner = await signedInUser({ name: 'Offline Editor' })
    const pond = await createPond(owner.client, { name: 'Quarry pond' })
    const fish = await createFish(owner.client, pond.id, { name: 'Ame', variety: 'Asagi' })
    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}/edit`)
    await page.getByLabel('Variety').waitFor()
    await browser.setOffline(true)
    await page.getByTestId('edit-offline-notice').waitFor()
    await page.getByLabel('Variety').fill('Shusui')
    await page.getByRole('button', { name: 'Save changes' }).click()
    await expect.poll(() => page.getByTestId('edit-message').textContent()).toContain('needs a connection — nothing was changed')
    expect(new URL(page.url()).pathname).toBe(`/fish/${fish.id}/edit`)
    expect(await page.getByLabel('Variety').inputValue()).toBe('Shusui')
    expect((await testDb().query('select variety, version from fish where id = $1', [fish.id])).rows[0]).toEqual({ variety: 'Asagi', version: fish.version })
    expect(await deviceStore(page, 'outbox')).toHaveLength(0)

    await browser.setOffline(false)
    await page.getByTestId('edit-offline-notice').waitFor({ state: 'detached' })
    await page.getByRole('button', { name: 'Save changes' }).click()
    await page.waitForURL(url => url.pathname === `/fish/${fish.id}`)
    expect((await testDb().query('select variety from fish where id = $1', [fish.id])).rows[0]).toEqual({ variety: 'Shusui' })
    await page.close()
  })

  it('sign-out clears every kept answer, the outbox database and the drafts; the service worker keeps no API answer, no session page and no Set-Cookie', async () => {
    const owner = await signedInUser({ name: 'Careful Owner' })
    const pond = await createPond(owner.client, { name: 'Courtyard pond' })
    const fish = await createFish(owner.client, pond.id, { name: 'Yuki' })
    const page = await openPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/fish/${fish.id}`)
    await readyForOffline(page, fish.id)
    await page.goto(`/ponds/${pond.id}`)
    await expect.poll(() => keptKeys(page)).toContain(`/api/ponds/${pond.id}/fish`)

    // With something unsent, sign-out asks first.
    await openFish(page, fish.id)
    await browser.setOffline(true)
    await addWeight(page, '1.1', '40')
    await page.getByTestId('sign-out').click()
    await page.getByTestId('sign-out-confirm').waitFor()
    await page.getByTestId('sign-out-cancel').click()
    await page.getByTestId('sign-out-confirm').waitFor({ state: 'detached' })
    await browser.setOffline(false)
    await page.getByTestId('timeline-waiting').waitFor({ state: 'detached', timeout: 30_000 })

    // The outbox is empty now: sign-out goes straight through and clears the device.
    await page.getByTestId('sign-out').click()
    await page.waitForURL(url => url.pathname === '/sign-in')
    const left = await page.evaluate(async () => ({
      databases: (await indexedDB.databases()).map(d => d.name),
      local: Object.keys(localStorage).filter(key => key.startsWith('fintrail')),
      caches: await Promise.all((await caches.keys()).map(async name => ({
        name,
        urls: (await (await caches.open(name)).keys()).map(request => new URL(request.url).pathname),
      }))),
    }))
    expect(left.databases.filter(name => name?.startsWith('fintrail'))).toEqual([])
    expect(left.local).toEqual([])
    // What stays is the app itself: built files, icons and the empty shell; never an API answer or a page with records.
    const urls = left.caches.flatMap(cache => cache.urls)
    expect(urls.length).toBeGreaterThan(10)
    for (const url of urls) expect(url).toMatch(/^\/(_nuxt\/|icons\/|offline-shell$|manifest\.webmanifest$)/)
    expect(left.caches.map(cache => cache.name).every(name => name.startsWith('workbox-precache') || name.startsWith('fintrail-shell-'))).toBe(true)
    const shell = await page.evaluate(async () => (await (await caches.match('/offline-shell'))!.text()))
    expect(shell).not.toContain('Careful Owner')
    expect(shell).not.toContain(owner.email)

    // The shell answers the same to a signed-in request: no session is read, so no cookie is set.
    const signedInShell = await owner.client.request('GET', '/offline-shell', { headers: { accept: 'text/html' } })
    expect(signedInShell.status).toBe(200)
    expect(signedInShell.headers.getSetCookie()).toEqual([])
    expect(String(signedInShell.body)).not.toContain('Careful Owner')
    await page.close()
  })
})

async function openFish(page: Page, fishId: string) {
  await page.goto(`/fish/${fishId}`)
  await page.getByTestId('fish-name').waitFor()
  return page
}
