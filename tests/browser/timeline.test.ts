import { describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { browserForFile, screenshots, scrollThrough, signIn } from '../support/browser'
import type { ApiClient } from '../support/client'
import { testDb } from '../support/db'
import { DEMO, DEMO_PASSWORD, demoClient, demoPond } from '../support/demo'

const chromium = browserForFile()

async function demoFish(client: ApiClient, pondName: string, fishName: string) {
  const pond = await demoPond(client, pondName)
  const fish = (await client.get(`/api/ponds/${pond.id}/fish`)).body as { id: string, name: string }[]
  return { pondId: pond.id, fishId: fish.find(f => f.name === fishName)!.id }
}

/** Runs a request inside the page, with its session cookie: what the browser itself would be allowed. */
function fetchInPage(page: Page, url: string, body: unknown) {
  return page.evaluate(async ({ url, body }) => {
    const response = await fetch(url, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) })
    return response.status
  }, { url, body })
}

describe('the life record in Chromium', () => {
  it('lets the vet record an enucleation with its anaesthesia and shows it in the header', async () => {
    const api = await demoClient(DEMO.vet)
    // A demo fish whose left eye is still there (each run on the same database uses the next one).
    let chosen: { pondId: string, fishId: string, name: string } | undefined
    for (const [pond, name] of [['Whitlock koi pond', 'Ghost'], ['Whitlock koi pond', 'Rusty'], ['Whitlock koi pond', 'Duchess'], ['Garden pond', 'Marble'], ['Garden pond', 'Tancho'], ['Garden pond', 'Juniper']] as const) {
      const fish = await demoFish(api, pond, name)
      if (!(await api.get(`/api/fish/${fish.fishId}/facts`)).body.eyes.left) {
        chosen = { ...fish, name }
        break
      }
    }
    expect(chosen, 'a demo fish with a left eye').toBeDefined()

    const page = await chromium.context.newPage()
    await signIn(page, DEMO.vet, DEMO_PASSWORD)
    await page.goto(`/fish/${chosen!.fishId}`, { waitUntil: 'networkidle' })
    await page.getByTestId('standing-facts').waitFor()
    expect(await page.getByTestId('fact-eyes').count()).toBe(0)
    await page.getByTestId('add-procedure').click()
    const form = page.getByTestId('entry-form')
    await form.getByTestId('data.code-enucleation').click()
    await form.getByLabel('In your words (optional)').fill('Removal of the left eye with the mass behind it')
    await form.getByTestId('data.side-left').click()
    await form.getByLabel('Body site').fill('left eye')
    await form.getByLabel('Outcome').fill('Socket sutured; swimming at 35 minutes')
    // "Performed by" offers the pond's vets, this vet chosen.
    expect(await form.getByRole('radiogroup', { name: 'Performed by' }).getByRole('radio', { checked: true }).textContent()).toContain('Ada Okafor')
    expect(await form.getByTestId('with-anaesthesia').isChecked()).toBe(true)
    // The fish's earlier anaesthetics are there before the vet starts; the first caution is never folded away.
    await form.getByTestId('earlier-anaesthetics').waitFor()
    expect(await form.getByTestId('dose-caution-first').isVisible()).toBe(true)
    expect(await form.getByTestId('dose-caution-first').textContent()).toContain('licensed veterinarian')
    expect(await form.getByTestId('dose-cautions').textContent()).toMatch(/clean, well-aerated water from the same source/)
    expect(await form.getByLabel('Buffer').count()).toBe(1)
    await form.getByLabel('Agent').fill('Eugenol (clove oil)')
    expect(await form.getByLabel('Buffer').count()).toBe(0)
    await form.getByLabel('Agent').fill('MS-222 (tricaine methanesulfonate)')
    await form.getByLabel('Bath concentration (mg/L, ppm)').fill('100')
    await form.getByLabel('Water temperature (°C)').fill('18')
    await form.getByLabel('Induction (minutes)').fill('4')
    await form.getByLabel('Recovery (minutes)').fill('35')
    await form.getByTestId('entry-submit').click()
    await form.waitFor({ state: 'detached' })

    await expect.poll(() => page.getByTestId('fact-eyes').textContent()).toMatch(/left eye removed \d{1,2} [A-Z][a-z]{2} \d{4} — right eye only/)
    await expect.poll(() => page.getByTestId('entry-procedure').first().textContent()).toContain('Enucleation (eye removal)')
    expect(await page.getByTestId('entry-procedure').first().textContent()).toContain('Performed by Dr Ada Okafor')
    expect(await page.getByTestId('entry-anaesthesia').first().getByTestId('prolonged-recovery').isVisible()).toBe(true)
    expect(await page.getByTestId('fact-anaesthesia').textContent()).toMatch(/recovery 35 min/)
    expect(await page.getByTestId('fact-long-recovery').isVisible()).toBe(true)
    await screenshots(page, 'timeline-vet-after-enucleation')

    // The same eye cannot be chosen again; the server would refuse it too.
    await page.getByTestId('add-procedure').click()
    await form.getByTestId('data.code-enucleation').click()
    expect(await form.getByTestId('data.side-left').isDisabled()).toBe(true)
    expect(await form.getByTestId('eye-state').textContent()).toContain('left eye removed')
    await form.getByTestId('entry-form-close').click()
    await page.close()
  })

  it('lets a keeper add a weight and see the chart and the condition factor, and amend it', async () => {
    const { fishId } = await demoFish(await demoClient(DEMO.keeper), 'Garden pond', 'Pebble')
    const page = await chromium.context.newPage()
    await signIn(page, DEMO.keeper, DEMO_PASSWORD)
    await page.goto(`/fish/${fishId}`, { waitUntil: 'networkidle' })
    await scrollThrough(page)
    await page.getByTestId('growth-chart').waitFor()
    const before = await page.locator('[data-testid="growth-chart"] canvas').getAttribute('aria-label')
    await page.getByTestId('add-measurement').click()
    const form = page.getByTestId('entry-form')
    await form.getByLabel('Weight', { exact: true }).fill('1.9')
    await form.getByTestId('weight-unit-kg').click()
    await form.getByLabel('Length (cm)').fill('48')
    // 100 · 1900 / 48³ = 190000 / 110592 = 1.718 (Fulton; Nash et al. 2006).
    await expect.poll(() => form.getByTestId('measurement-preview').textContent()).toContain('Condition factor K (TL) 1.72')
    await form.getByTestId('entry-submit').click()
    await form.waitFor({ state: 'detached' })
    await expect.poll(() => page.getByTestId('fact-weight').textContent()).toContain('1.90 kg')
    expect(await page.getByTestId('fact-condition').textContent()).toContain('K (TL) 1.72')
    const after = await page.locator('[data-testid="growth-chart"] canvas').getAttribute('aria-label')
    expect(Number(after!.match(/(\d+) measurements/)![1])).toBe(Number(before!.match(/(\d+) measurements/)![1]) + 1)
    await screenshots(page, 'timeline-keeper-weight')

    await page.getByTestId('entry-measurement').first().getByTestId('amend-entry').click()
    await form.getByLabel('Length (cm)').fill('47.5')
    await form.getByLabel('Why amend it?').fill('Measured again, tail straight')
    await form.getByTestId('entry-submit').click()
    await form.waitFor({ state: 'detached' })
    const first = page.getByTestId('entry-measurement').first()
    await first.getByTestId('amended-badge').click()
    await expect.poll(() => first.getByTestId('revision-history').locator('li').count()).toBe(2)
    expect(await first.getByTestId('revision-history').textContent()).toContain('Measured again, tail straight')
    await page.close()
  })

  it('keeps what a keeper typed when the network fails on the device, and sends it once when it is back', async () => {
    const api = await demoClient(DEMO.usKeeper)
    const { fishId } = await demoFish(api, 'Garden pond', 'Kenzo')
    const count = async () => {
      const { rows } = await testDb().query(`select count(*)::int as n from timeline_entries where fish_id = $1 and kind = 'measurement'`, [fishId])
      return rows[0].n as number
    }
    const before = await count()
    const page = await chromium.context.newPage()
    await signIn(page, DEMO.usKeeper, DEMO_PASSWORD)
    await page.goto(`/fish/${fishId}`, { waitUntil: 'networkidle' })
    await page.getByTestId('add-measurement').click()
    const form = page.getByTestId('entry-form')
    // This person works in US units: pounds and ounces, inches.
    await form.getByLabel('Pounds').fill('6')
    await form.getByLabel('Ounces').fill('4')
    await form.getByLabel('Length (in)').fill('22.5')
    await chromium.context.setOffline(true)
    try {
      await form.getByTestId('entry-submit').click()
      // No connection: the entry waits on this device under the id made here, shown as waiting to send.
      await form.waitFor({ state: 'detached' })
      await expect.poll(() => page.getByTestId('waiting-measurement').count()).toBe(1)
      expect(await count()).toBe(before)
      await screenshots(page, 'timeline-offline-form')
    }
    finally {
      // The browser is shared by the file's tests: it must not stay offline if a check above failed.
      await chromium.context.setOffline(false)
    }
    // Back online, the outbox sends it by itself.
    await expect.poll(count, { timeout: 30_000 }).toBe(before + 1)
    await page.reload({ waitUntil: 'networkidle' })
    await expect.poll(() => page.getByTestId('fact-weight').textContent()).toContain('6 lb 4.0 oz')
    const latest = (await api.get(`/api/fish/${fishId}/timeline?kind=measurement&limit=1`)).body.entries
    // 6 lb 4 oz = 6 × 453.59237 + 4 × 28.349523125 = 2834.952 g; 22.5 in = 57.15 cm (NIST SP 811).
    expect(latest[0].data).toMatchObject({ weightG: 2834.952, lengthCm: 57.15, entered: { weight: '6 lb 4 oz', length: '22.5 in' } })
    expect(await count()).toBe(before + 1)
    await page.close()
  })

  it('does not offer a keeper a procedure, and the server refuses one', async () => {
    const { fishId } = await demoFish(await demoClient(DEMO.keeper), 'Garden pond', 'Pilot')
    const page = await chromium.context.newPage()
    await signIn(page, DEMO.keeper, DEMO_PASSWORD)
    await page.goto(`/fish/${fishId}`, { waitUntil: 'networkidle' })
    await page.getByTestId('quick-add').waitFor()
    if (await page.getByTestId('more-kinds').count()) await page.getByTestId('more-kinds').click()
    const offered = await page.getByTestId('quick-add').locator('button[data-testid^="add-"]').evaluateAll(buttons => buttons.map(b => b.getAttribute('data-testid')))
    expect(offered.sort()).toEqual(['add-companion', 'add-measurement', 'add-observation', 'add-problem', 'add-treatment'])
    expect(await page.getByTestId('add-problem').textContent()).toContain('Suspected problem')
    const status = await fetchInPage(page, `/api/fish/${fishId}/timeline`, {
      kind: 'procedure', occurredAt: new Date().toISOString().slice(0, 10), data: { code: 'fin_trim', side: 'not_applicable', performedBy: 'Priya' },
    })
    expect(status).toBe(403)
    expect(await page.getByTestId('fact-eyes').textContent()).toContain('left eye removed 23 May 2019')
    expect(await page.getByTestId('fact-companions').textContent()).toContain('follows')
    await screenshots(page, 'timeline-keeper-pilot')
    await page.close()
  })

  it('shows a treatment course as doses, a missed one on the profile, and lets the keeper tick one off', async () => {
    const vet = await demoClient(DEMO.vet)
    const { fishId } = await demoFish(vet, 'Garden pond', 'Bento')
    const hours = (n: number) => new Date(Date.now() + n * 3_600_000).toISOString()
    // Three daily doses, due 36 h ago, 12 h ago and in 12 h: none given yet, so two are missed.
    const written = await vet.post(`/api/fish/${fishId}/timeline`, {
      kind: 'treatment', occurredAt: hours(-36),
      data: { drug: 'Course under test', route: 'in_feed', dose: 30, doseUnit: 'mg/kg of feed', startOn: hours(-36).slice(0, 10), doseCount: 3, intervalHours: 24, firstDoseAt: hours(-36) },
    })
    expect(written.status, JSON.stringify(written.body)).toBe(201)
    const entryId = written.body.entry.id as string
    const page = await chromium.context.newPage()
    await signIn(page, DEMO.keeper, DEMO_PASSWORD)
    await page.goto(`/fish/${fishId}`, { waitUntil: 'networkidle' })
    const fact = page.getByTestId(`fact-treatment-${entryId}`)
    await fact.waitFor()
    expect(await fact.textContent()).toContain('Prescribed by Dr Ada Okafor')
    expect(await fact.getByTestId('fact-missed-dose').count()).toBe(2)
    const entry = page.locator(`#entry-${entryId}`)
    expect(await entry.getByTestId('dose-1').getAttribute('data-state')).toBe('missed')
    await screenshots(page, 'timeline-missed-doses')
    await entry.getByTestId('dose-given-1').click()
    await expect.poll(() => entry.getByTestId('dose-1').getAttribute('data-state'), { timeout: 15_000 }).toBe('given')
    expect(await entry.getByTestId('dose-1').textContent()).toContain('by Priya Anand')
    await expect.poll(() => fact.getByTestId('fact-missed-dose').count(), { timeout: 15_000 }).toBe(1)
    await page.close()
  })

  it('takes the person to the reason when an amendment has none', async () => {
    const { fishId } = await demoFish(await demoClient(DEMO.keeper), 'Garden pond', 'Pebble')
    const page = await chromium.context.newPage()
    await page.setViewportSize({ width: 390, height: 700 })
    await signIn(page, DEMO.keeper, DEMO_PASSWORD)
    await page.goto(`/fish/${fishId}`, { waitUntil: 'networkidle' })
    await page.getByTestId('entry-measurement').first().getByTestId('amend-entry').click()
    const form = page.getByTestId('entry-form')
    await form.getByTestId('entry-submit').click()
    const error = form.getByTestId('error-reason')
    await error.waitFor()
    expect(await error.isVisible()).toBe(true)
    expect(await page.evaluate(() => document.activeElement?.id)).toBe('reason')
    const box = await error.boundingBox()
    expect(box!.y).toBeGreaterThanOrEqual(0)
    expect(box!.y + box!.height).toBeLessThanOrEqual(700)
    await form.getByTestId('entry-form-close').click()
    await page.close()
  })

  it('shows the pond’s length–weight curve with its b, and flags the fish losing weight', async () => {
    const page = await chromium.context.newPage()
    await signIn(page, DEMO.keeper, DEMO_PASSWORD)
    await page.getByTestId('pond-Garden pond').click()
    await page.getByRole('heading', { name: 'Length and weight' }).waitFor()
    await scrollThrough(page)
    await page.getByTestId('length-weight-chart').waitFor()
    expect(await page.getByTestId('length-weight-fits').textContent()).toMatch(/Koi\s+Cyprinus carpio:.*b = \d\.\d\d/)
    await page.getByTestId('view-table').click()
    const saffron = page.getByTestId('fish-table').locator('tr', { hasText: 'Saffron' })
    expect(await saffron.textContent()).toContain('losing weight')
    await screenshots(page, 'pond-length-weight')
    await saffron.getByRole('link', { name: 'Saffron' }).click()
    await page.getByTestId('fact-problems').waitFor()
    expect(await page.getByTestId('fact-problems').textContent()).toContain('Weight loss, cause not yet known')
    await page.getByRole('heading', { name: 'Growth and condition' }).waitFor()
    await scrollThrough(page)
    expect(await page.getByTestId('growth-alerts').textContent()).toMatch(/Weight fell 1\d\.\d %/)
    await screenshots(page, 'fish-profile-losing-weight')
    await page.close()
  })
})
