import { writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { BrowserContext, Page } from 'playwright-core'
import { axeAtBothWidths, PHONE } from '../support/axe'
import { openBrowser, signIn } from '../support/browser'
import { closeTestDb, testDb } from '../support/db'
import { createFish, createPond, pondWithRoles, signedInUser, uniqueEmail } from '../support/factories'
import { tokenFromMail } from '../support/custody'
import { benchFish, renderShot, rotatedCroppedDarker } from '../../scripts/bench/which-fish-set'

// WCAG 2.1 A and AA (axe-core's rules with those tags) on every page, signed out and signed in as the
// demo owner, keeper and vet, with the entry forms, the uploader and the photo viewer open, at 390 px and
// 1280 px. One Chromium, one page per person; each test collects every failure before it fails, so one run
// lists all of them with the rule, the element and the contrast found.

const DEMO_PASSWORD = 'pondside-demo-2026'
const OWNER = 'helen.marlow@example.com'
const KEEPER = 'tom.marlow@example.com'
const VET = 'ada.okafor@example.com'

let browser: BrowserContext
let garden: { pondId: string, saffronId: string, pilotId: string }

beforeAll(async () => {
  browser = await openBrowser(PHONE.width, PHONE.height)
  // Fifty pages in a row: a busy machine must slow this test down, not fail it.
  browser.setDefaultTimeout(45_000)
  const { rows: ponds } = await testDb().query(`select id from ponds where name = 'Garden pond' order by created_at limit 1`)
  const pondId = ponds[0].id as string
  const { rows: fish } = await testDb().query(`select id, name from fish where pond_id = $1 and name in ('Saffron', 'Pilot')`, [pondId])
  const idOf = (name: string) => fish.find(f => f.name === name)!.id as string
  garden = { pondId, saffronId: idOf('Saffron'), pilotId: idOf('Pilot') }
})
afterAll(async () => {
  await browser?.close()
  await closeTestDb()
})

function expectNoViolations(found: string[]) {
  expect(found, `${found.length} accessibility failures:\n${found.join('\n')}`).toHaveLength(0)
}

/** Opens a page at phone width and waits until the network is quiet and client-only parts have drawn. */
async function visit(page: Page, path: string) {
  await page.setViewportSize(PHONE)
  await page.goto(path, { waitUntil: 'networkidle' })
}

/** Each quick-add form of the fish the page shows, opened and checked inside its dialog, then closed. */
async function checkEntryForms(page: Page, kinds: string[], found: string[], who: string) {
  for (const kind of kinds) {
    const button = page.getByTestId(`add-${kind}`)
    if (!(await button.isVisible())) await page.getByTestId('more-kinds').click()
    await button.click()
    await page.getByTestId('entry-form').waitFor()
    await page.waitForLoadState('networkidle')
    found.push(...await axeAtBothWidths(page, `${who}: ${kind} form`, '[role="dialog"]'))
    await page.getByTestId('entry-form-close').click()
    await page.getByTestId('entry-form').waitFor({ state: 'detached' })
  }
}

describe('WCAG 2.1 AA (axe-core) at 390 px and 1280 px', () => {
  it('signed out: sign-in, sign-up, password pages, the offer pages and a page that does not exist', { timeout: 600_000 }, async () => {
    // Offers to people who have no account yet: each page shows what is offered and the way to sign up.
    const owner = await signedInUser({ name: 'Offering Owner' })
    const pond = await createPond(owner.client, { name: `Offer pond ${Date.now() % 100000}` })
    const fish = await createFish(owner.client, pond.id, { name: 'Wanderer' })
    const [invitee, heir, adopter] = [uniqueEmail('invitee'), uniqueEmail('heir'), uniqueEmail('adopter')]
    const since = new Date()
    expect((await owner.client.post(`/api/ponds/${pond.id}/invitations`, { email: invitee, role: 'keeper' })).status).toBe(201)
    expect((await owner.client.post(`/api/ponds/${pond.id}/handovers`, { email: heir, membersOption: 'stay' })).status).toBe(201)
    expect((await owner.client.post(`/api/fish/${fish.id}/transfers`, { email: adopter })).status).toBe(201)
    const [invitation, handover, transfer] = await Promise.all([
      tokenFromMail(invitee, pond.name, '/invitations/', since),
      tokenFromMail(heir, 'offers you the pond', '/handovers/', since),
      tokenFromMail(adopter, fish.name, '/transfers/', since),
    ])

    const page = await browser.newPage()
    const found: string[] = []
    for (const path of ['/sign-in', '/sign-up', '/forgot-password', '/reset-password?token=not-a-real-token', `/invitations/${invitation}`, `/handovers/${handover}`, `/transfers/${transfer}`]) {
      await visit(page, path)
      found.push(...await axeAtBothWidths(page, `signed out ${path.split('?')[0]}`))
    }
    // The sign-in form with its messages showing.
    await visit(page, '/sign-in')
    await page.getByTestId('sign-in-submit').click()
    await page.locator('.field-error').first().waitFor()
    found.push(...await axeAtBothWidths(page, 'signed out /sign-in with errors'))
    await page.close()

    // The same offers seen by the people they were sent to, signed in.
    const signedInPage = await browser.newPage()
    for (const [email, path] of [[invitee, `/invitations/${invitation}`], [adopter, `/transfers/${transfer}`]] as const) {
      const person = await signedInUser({ email, name: 'Offered Person' })
      await signIn(signedInPage, email, person.password)
      await visit(signedInPage, path)
      found.push(...await axeAtBothWidths(signedInPage, `recipient ${path.split('/')[1]}`))
    }
    await signedInPage.close()
    expectNoViolations(found)
  })

  it('the demo owner: ponds, the fish table, which fish, imports, water, doses, account, due list', { timeout: 600_000 }, async () => {
    const page = await browser.newPage()
    const found: string[] = []
    await signIn(page, OWNER, DEMO_PASSWORD)
    const { pondId, saffronId } = garden
    const pages: [string, string][] = [
      ['home', '/'],
      ['pond', `/ponds/${pondId}`],
      ['pond settings', `/ponds/${pondId}/settings`],
      ['new pond', '/ponds/new'],
      ['pond archive import', '/ponds/import'],
      ['measurement import', `/ponds/${pondId}/import`],
      ['new fish', `/ponds/${pondId}/fish/new`],
      ['water', `/ponds/${pondId}/water`],
      ['doses', `/ponds/${pondId}/doses`],
      ['fish profile', `/fish/${saffronId}`],
      ['fish edit', `/fish/${saffronId}/edit`],
      ['account', '/account'],
      ['due list', '/due'],
      ['missing fish', '/fish/00000000-0000-4000-8000-000000000000'],
    ]
    for (const [name, path] of pages) {
      await visit(page, path)
      found.push(...await axeAtBothWidths(page, `owner: ${name}`))
    }

    // The fish list as a table, and "Which fish is this?" with a photo ranked.
    await visit(page, `/ponds/${pondId}`)
    await page.getByTestId('view-table').click()
    await page.getByTestId('fish-table').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: pond table'))
    await page.locator('#length-weight-heading').scrollIntoViewIfNeeded()
    await page.getByTestId('length-weight-table-toggle').click()
    await page.getByTestId('length-weight-table').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: length–weight chart as a table'))
    await page.getByTestId('which-fish-open-panel').click()
    await page.getByTestId('which-fish').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: which fish (empty)'))
    const photo = join(tmpdir(), `which-fish-a11y-${Date.now()}.jpg`)
    const [drawn] = benchFish(1)
    writeFileSync(photo, await renderShot(drawn!, rotatedCroppedDarker(drawn!)))
    await page.getByTestId('which-fish-input').setInputFiles(photo)
    await page.locator('[data-testid="which-fish-candidates"], [data-testid="which-fish-none"]').first().waitFor({ timeout: 90_000 })
    found.push(...await axeAtBothWidths(page, 'owner: which fish (answer)'))

    // The measurement import with a file mapped and previewed (nothing is written before "Import").
    const sheet = join(tmpdir(), `a11y-weigh-ins-${Date.now()}.csv`)
    writeFileSync(sheet, 'Koi,Date,Weight (kg),Length (cm)\nSaffron,2024-05-01,2.9,52\nNobody,2024-06-01,1.3,42\n')
    await visit(page, `/ponds/${pondId}/import`)
    await page.getByTestId('import-file').setInputFiles(sheet)
    await page.getByTestId('import-mapping').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: import mapping'))
    await page.getByLabel('weight unit', { exact: true }).selectOption('kg')
    await page.getByTestId('import-preview').click()
    await page.getByTestId('import-problems').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: import preview'))

    await page.close()
    expectNoViolations(found)
  })

  it('the demo owner: a fish with its chart table, entry forms, uploader and photo viewer open; the printable record', { timeout: 600_000 }, async () => {
    const page = await browser.newPage()
    const found: string[] = []
    await signIn(page, OWNER, DEMO_PASSWORD)
    const { saffronId } = garden
    await visit(page, `/fish/${saffronId}`)
    // The growth section loads when it comes near the screen.
    await page.locator('#growth-heading').scrollIntoViewIfNeeded()
    await page.getByTestId('growth-table-toggle').click()
    await page.getByTestId('growth-table').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: growth chart as a table'))
    await checkEntryForms(page, ['measurement', 'observation', 'problem', 'companion', 'treatment', 'death'], found, 'owner')
    await page.getByTestId('add-photos').click()
    await page.getByTestId('photo-uploader').waitFor()
    await page.waitForTimeout(300)
    found.push(...await axeAtBothWidths(page, 'owner: uploader open'))
    await page.getByTestId('photo-thumb').first().click()
    await page.getByTestId('photo-large').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: photo viewer', '[data-testid="photo-viewer"]'))
    await page.keyboard.press('Escape')

    // The printable record, once all its entries have been read.
    await visit(page, `/fish/${saffronId}/record`)
    await page.getByTestId('record-completeness').waitFor()
    found.push(...await axeAtBothWidths(page, 'owner: printable record'))
    await page.close()
    expectNoViolations(found)
  })

  it('the demo keeper (US units): the pond, a fish with its forms open, water', { timeout: 600_000 }, async () => {
    const page = await browser.newPage()
    const found: string[] = []
    await signIn(page, KEEPER, DEMO_PASSWORD)
    for (const [name, path] of [['pond', `/ponds/${garden.pondId}`], ['water', `/ponds/${garden.pondId}/water`], ['fish profile', `/fish/${garden.pilotId}`]] as const) {
      await visit(page, path)
      found.push(...await axeAtBothWidths(page, `keeper (US units): ${name}`))
    }
    await checkEntryForms(page, ['measurement', 'observation'], found, 'keeper')
    await page.close()
    expectNoViolations(found)
  })

  it('the demo vet and a vet of a new pond: due list, clinical forms, doses and a visit', { timeout: 600_000 }, async () => {
    const page = await browser.newPage()
    const found: string[] = []
    await signIn(page, VET, DEMO_PASSWORD)
    for (const [name, path] of [['due list', '/due'], ['pond', `/ponds/${garden.pondId}`], ['doses', `/ponds/${garden.pondId}/doses`], ['fish profile', `/fish/${garden.saffronId}`]] as const) {
      await visit(page, path)
      found.push(...await axeAtBothWidths(page, `vet: ${name}`))
    }
    await checkEntryForms(page, ['exam', 'procedure', 'treatment', 'lab_result', 'anaesthesia'], found, 'vet')

    // A visit of a pond of its own (the demo ponds stay as they are for other tests): open, then closed.
    const world = await pondWithRoles()
    const fishSeen = [world.fish.id]
    const opened = await world.vet.client.post(`/api/ponds/${world.pond.id}/visits`, { visitedOn: new Date().toISOString().slice(0, 10), purpose: 'follow_up', fishSeen })
    expect(opened.status, JSON.stringify(opened.body)).toBe(201)
    // Water tests recorded during the visit: the charts, their sentences and one as a table.
    for (const [days, reading] of [[20, { pH: 7.4, temperatureC: 14, tanMgL: 0.1, nitriteNMgL: 0 }], [6, { pH: 7.9, temperatureC: 17, tanMgL: 0.6 }], [0, { pH: 8.4, temperatureC: 18, tanMgL: 1.2, khDKH: 3 }]] as const) {
      const testedAt = new Date(Date.now() - days * 86_400_000).toISOString()
      expect((await world.vet.client.post(`/api/ponds/${world.pond.id}/water-tests`, { testedAt, ...reading })).status).toBe(201)
    }
    await signIn(page, world.vet.email, world.vet.password)
    await visit(page, `/ponds/${world.pond.id}`)
    found.push(...await axeAtBothWidths(page, 'vet: pond with an open visit'))
    await visit(page, `/ponds/${world.pond.id}/water`)
    await page.getByTestId('water-pH-table-toggle').click()
    await page.getByTestId('water-pH-table').waitFor()
    found.push(...await axeAtBothWidths(page, 'vet: water charts with a table'))
    expect((await world.vet.client.post(`/api/ponds/${world.pond.id}/visits/${opened.body.visit.id}/close`, { findings: 'All well.' })).status).toBe(200)
    await visit(page, `/ponds/${world.pond.id}/visits/${opened.body.visit.id}`)
    await page.getByTestId('visit-summary').waitFor()
    found.push(...await axeAtBothWidths(page, 'vet: visit summary'))
    await page.close()
    expectNoViolations(found)
  })
})
