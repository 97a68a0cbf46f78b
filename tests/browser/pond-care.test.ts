import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, scrollThrough, signIn } from '../support/browser'
import type { ApiClient } from '../support/client'
import { DEMO, DEMO_PASSWORD, demoClient, demoPond } from '../support/demo'

const chromium = browserForFile()

const day = (offset: number) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10)

async function pondNamed(client: ApiClient, name: string) {
  const pond = await demoPond(client, name)
  const fish = (await client.get(`/api/ponds/${pond.id}/fish`)).body as { id: string, name: string }[]
  return { pond, fish }
}

describe('the vet’s worklist, visits and whole-pond events in Chromium', () => {
  it('opens a pond from the worklist, records salt for the whole pond, and shows a visit summary to print', async () => {
    const api = await demoClient(DEMO.vet)
    const whitlock = await pondNamed(api, 'Whitlock koi pond')
    const ghost = whitlock.fish.find(f => f.name === 'Ghost')!
    const recheck = await api.post(`/api/fish/${ghost.id}/timeline`, {
      kind: 'procedure', occurredAt: day(0), data: { code: 'wound_care', name: 'Wound debridement', bodySite: 'right flank', side: 'right', performedBy: 'Dr Ada Okafor', recheckOn: day(1) },
    })
    expect(recheck.status, JSON.stringify(recheck.body)).toBe(201)

    const page = await chromium.context.newPage()
    await signIn(page, DEMO.vet, DEMO_PASSWORD)
    await page.getByTestId('open-due').click()
    await page.waitForURL('**/due')
    const items = page.getByTestId('due-item')
    await items.first().waitFor()
    // Sorted by date, then pond: the recheck due tomorrow for Ghost is there, and the list spans the vet's ponds.
    const rows = await items.allInnerTexts()
    expect(rows.some(r => r.includes('Recheck') && r.includes('Ghost') && r.includes('Whitlock koi pond'))).toBe(true)
    expect(new Set(rows.map(r => ['Garden pond', 'Courtyard pond', 'Whitlock koi pond'].find(name => r.includes(name)))).size).toBeGreaterThan(1)
    await screenshots(page, 'due-worklist')

    await page.locator('[data-testid="due-item"]', { hasText: 'Ghost' }).first().getByRole('link').click()
    await page.waitForURL(`**/ponds/${whitlock.pond.id}`)
    await expect(page.getByTestId('pond-name').innerText()).resolves.toBe('Whitlock koi pond')
    // What is due, the visits and the whole-pond events sit below the fish and load when scrolled to.
    await scrollThrough(page)
    await page.getByTestId('pond-due').getByText('Ghost').first().waitFor()
    await page.getByTestId('pond-visits').waitFor()

    // Salt for the whole pond: the amount that does not match the level is questioned first.
    await page.getByTestId('add-pond-event').click()
    await page.getByTestId('pond-treatment-cautions').waitFor()
    const volume = Number(await page.locator('#volumeLitres').inputValue())
    await page.locator('[id="data.percent"]').fill('0.3')
    await page.locator('[id="data.amountKg"]').fill(String(Math.round(volume * 0.003 * 10)))
    await page.getByTestId('pond-event-save').click()
    await page.getByTestId('pond-event-warnings').waitFor()
    await page.locator('[id="data.amountKg"]').fill(String(Number((volume * 0.003).toFixed(1))))
    await page.getByTestId('pond-event-save').click()
    await page.getByTestId('pond-event-salt').first().waitFor()
    await expect(page.getByTestId('pond-event-salt').first().innerText()).resolves.toContain('Ghost')
    await screenshots(page, 'pond-care')

    // A visit with an entry, closed; its summary page lists the fish and what was done.
    const opened = await api.post(`/api/ponds/${whitlock.pond.id}/visits`, { visitedOn: day(0), purpose: 'follow_up', fishSeen: [ghost.id] })
    expect(opened.status, JSON.stringify(opened.body)).toBe(201)
    expect((await api.post(`/api/fish/${ghost.id}/timeline`, { kind: 'exam', occurredAt: new Date().toISOString(), data: { reason: 'Recheck of the flank wound', assessment: 'Granulating well' } })).status).toBe(201)
    expect((await api.post(`/api/ponds/${whitlock.pond.id}/visits/${opened.body.visit.id}/close`, { findings: 'Flank wound healing; no new lesions.' })).status).toBe(200)
    await page.goto(`/ponds/${whitlock.pond.id}/visits/${opened.body.visit.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('visit-summary').waitFor()
    await expect(page.getByTestId('visit-fish-seen').innerText()).resolves.toBe('Ghost')
    await expect(page.getByTestId('visit-entry').first().innerText()).resolves.toContain('Granulating well')
    await screenshots(page, 'visit-summary')

    // Ghost's own timeline carries the salt, from the pond.
    await page.goto(`/fish/${ghost.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('entry-pond_event').first().waitFor()
    await screenshots(page, 'fish-timeline-pond-event')
    await page.close()
  })
})
