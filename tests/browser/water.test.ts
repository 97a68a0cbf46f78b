import { describe, expect, it } from 'vitest'
import { injectionVolumeMl } from '../../shared/utils/doses'
import { roundForSyringe } from '../../shared/utils/dose-helpers'
import { browserForFile, screenshots, scrollThrough, signIn } from '../support/browser'
import { DEMO, DEMO_PASSWORD, demoClient, demoPond } from '../support/demo'

const chromium = browserForFile()

describe('the water log in Chromium', () => {
  it('Tom (US units) records a test in °F, sees the flags and the chart with the fish’s events', async () => {
    const api = await demoClient(DEMO.usKeeper)
    const pond = await demoPond(api, 'Garden pond')
    const fish = ((await api.get(`/api/ponds/${pond.id}/fish`)).body as { id: string, name: string, status: string }[]).find(f => f.status === 'alive')!
    // Something that happened to a fish yesterday, so it falls inside the chart's time range.
    const observation = await api.post(`/api/fish/${fish.id}/timeline`, {
      kind: 'observation', occurredAt: new Date(Date.now() - 86_400_000).toISOString(), data: { signs: ['flashing'], text: 'Flashing against the liner' },
    })
    expect(observation.status, JSON.stringify(observation.body)).toBe(201)

    const page = await chromium.context.newPage()
    await signIn(page, DEMO.usKeeper, DEMO_PASSWORD)
    await page.goto(`/ponds/${pond.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('pond-water-link').click()
    await page.waitForURL(`**/ponds/${pond.id}/water`)
    await page.getByTestId('water-test-form').waitFor()

    // A US-units keeper types the temperature in °F; the form shows what it understood in °C.
    await expect.poll(() => page.getByTestId('water-temperatureC-unit').inputValue()).toBe('F')
    await page.getByTestId('water-temperatureC').fill('77')
    await page.getByTestId('water-pH').fill('8.0')
    await page.getByTestId('water-tanMgL').fill('1.0')
    await page.getByTestId('water-nitriteNMgL-unit').selectOption('NO2')
    await page.getByTestId('water-nitriteNMgL').fill('0.25')
    expect(await page.getByTestId('water-temperatureC-understood').textContent()).toContain('77 °F = 25 °C')
    // NO2 → NO2-N: 0.25 / 3.2844 = 0.076117 (molar masses, docs/references.md).
    expect(await page.getByTestId('water-nitriteNMgL-understood').textContent()).toContain('= 0.076117 mg/L NO2-N')
    await page.getByTestId('save-water-test').click()

    // IFAS FA16 worked example: TAN 1.0 at 24 °C, pH 8.0 → 0.0502 NH3-N; at 25 °C it is higher still, above 0.02.
    const saved = page.getByTestId('water-saved')
    await saved.waitFor()
    expect(await saved.textContent()).toMatch(/Total ammonia \(TAN\) high.*Un-ionized ammonia \(NH3-N\) high/)
    const stored = (await api.get(`/api/ponds/${pond.id}/water-tests`)).body.waterTests[0]
    expect(stored.temperatureC).toBe(25)
    expect(stored.nitriteNMgL).toBeCloseTo(0.076117, 6)
    expect(stored.testedBy.name).toBe('Tom Marlow')

    await scrollThrough(page)
    await page.getByTestId('water-chart-temperatureC').locator('canvas').waitFor()
    const events = page.getByTestId('water-chart-events')
    await events.waitFor()
    expect(await events.textContent()).toContain(`${fish.name} · Observation: flashing`)
    // The desk table shows the reading in °F with its flag.
    const row = page.getByTestId('water-test-row').first()
    expect(await row.textContent()).toContain('77.0')
    expect(await row.getByTestId('row-flag-unionizedAmmoniaNMgL').textContent()).toBe('high')
    await screenshots(page, 'water-log')
    await page.setViewportSize({ width: 390, height: 844 })
    expect(await page.getByTestId('water-test-card').first().getByTestId('flag-tanMgL').textContent()).toBe('high')
    await page.close()
  })

  it('the vet works out an injection from a fish’s recorded weight and saves it as a treatment', async () => {
    const api = await demoClient(DEMO.vet)
    const pond = await demoPond(api, 'Whitlock koi pond')
    const fishList = (await api.get(`/api/ponds/${pond.id}/fish`)).body as { id: string, name: string, status: string }[]
    let chosen: { id: string, name: string, weightG: number, at: string } | undefined
    for (const fish of fishList.filter(f => f.status === 'alive')) {
      const facts = (await api.get(`/api/fish/${fish.id}/facts`)).body
      if (facts.latestWeight) {
        chosen = { id: fish.id, name: fish.name, weightG: facts.latestWeight.weightG, at: facts.latestWeight.at }
        break
      }
    }
    expect(chosen, 'a demo fish with a recorded weight').toBeDefined()

    const page = await chromium.context.newPage()
    await signIn(page, DEMO.vet, DEMO_PASSWORD)
    await page.goto(`/ponds/${pond.id}/doses`, { waitUntil: 'networkidle' })
    await page.getByTestId('dose-helper-cautions').waitFor()
    expect(await page.getByTestId('dose-helper-cautions').textContent()).toMatch(/licensed veterinarian.*formulary.*label.*local rules.*[Aa]erate.*UV/s)
    await page.getByTestId('injection-fish').selectOption(chosen!.id)
    await page.getByTestId('injection-latest-weight').waitFor()
    await page.getByTestId('injection-drug').fill('Enrofloxacin 50 mg/mL')
    await page.getByTestId('injection-dose').fill('10')
    await page.getByTestId('injection-strength').fill('50')
    await page.getByTestId('injection-site').fill('intramuscular, below the dorsal fin')

    // The same arithmetic, worked out here from the recorded weight: mL = 10 mg/kg × kg ÷ 50 mg/mL, rounded to the syringe's marks.
    const expected = roundForSyringe(injectionVolumeMl(10, chosen!.weightG / 1000, 50)!)!
    await page.getByTestId('injection-result').waitFor()
    expect(Number(await page.getByTestId('injection-ml').textContent())).toBeCloseTo(expected.value, 6)
    expect(await page.getByTestId('injection-working').textContent()).toContain('10 mg/kg ×')
    const stale = (Date.now() - Date.parse(chosen!.at)) / 86_400_000 > 90
    expect(await page.getByTestId('injection-weight-stale').count()).toBe(stale ? 1 : 0)
    await screenshots(page, 'dose-injection')

    await page.getByTestId('injection-save').click()
    const outcome = page.locator('[data-testid="dose-saved"], [role="alert"]').first()
    await outcome.waitFor({ timeout: 40_000 })
    expect(await outcome.getAttribute('data-testid'), await outcome.textContent() ?? '').toBe('dose-saved')
    const timeline = (await api.get(`/api/fish/${chosen!.id}/timeline?kind=treatment`)).body
    const entry = timeline.entries[0]
    expect(entry.data).toMatchObject({ drug: 'Enrofloxacin 50 mg/mL', route: 'injection', dose: 10, doseUnit: 'mg/kg', injectionSite: 'intramuscular, below the dorsal fin' })
    expect(entry.data.notes).toContain(`drawn ${expected.value} mL`)

    // Salt starts from the last measured salinity, or says there is none.
    await page.getByTestId('helper-salt').click()
    const pondDetail = (await api.get(`/api/ponds/${pond.id}`)).body
    if (pondDetail.volumeLitres != null) expect(await page.getByTestId('salt-last-salinity').textContent()).toMatch(/Last measured salinity|No salinity has been measured/)
    await page.getByTestId('salt-tank').check()
    await page.getByTestId('salt-volume').fill('200')
    await page.getByTestId('salt-target').fill('0.3')
    // docs/references.md: 0.3 % = 3 g/L; 3 g/L × 200 L (typed in the person's gallons or litres) is worked out on screen.
    await page.getByTestId('salt-result').waitFor()
    expect(await page.getByTestId('salt-result').textContent()).toContain('Add 0.6 kg of salt')
    await screenshots(page, 'dose-salt')
    await page.close()
  })

  it('the pond volume helper answers in gallons with the caution beside it', async () => {
    const page = await chromium.context.newPage()
    await signIn(page, DEMO.usKeeper, DEMO_PASSWORD)
    const api = await demoClient(DEMO.usKeeper)
    const pond = await demoPond(api, 'Courtyard pond')
    await page.goto(`/ponds/${pond.id}/settings`, { waitUntil: 'networkidle' })
    await page.getByTestId('pond-volume-helper').waitFor()
    await page.getByTestId('shape-rectangle').check()
    await page.getByTestId('volume-length-unit').selectOption('ft')
    await page.getByTestId('volume-length').fill('10')
    await page.getByTestId('volume-width').fill('8')
    await page.getByTestId('volume-depth').fill('3')
    // NIST: 240 ft³ × 28.316846592 L/ft³ = 6,796.04 L = 1,795.3 US gal (÷ 3.785411784).
    const result = page.getByTestId('volume-result')
    await result.waitFor()
    expect(await result.textContent()).toMatch(/About 1,795 US gallons/)
    expect(await result.textContent()).toMatch(/hold less than this.*sets treatment amounts/)
    await screenshots(page, 'pond-volume')
    await page.close()
  })
})
