import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { testDb } from '../support/db'
import { createFish, createPond, signedInUser } from '../support/factories'
import { daysAgo } from '../support/timeline'

const chromium = browserForFile()

async function weightsOf(fishId: string) {
  const { rows } = await testDb().query(`select data from timeline_entries where fish_id = $1 and kind = 'measurement' order by occurred_at`, [fishId])
  return rows.map(r => r.data as { weightG?: number, warnings?: { code: string }[] })
}

describe('typed numbers in Chromium', () => {
  it('a point-decimal keeper types "1,250" g, sees "= 1,250 g", and 1250 g is saved', async () => {
    const person = await signedInUser({ name: 'Point Keeper' })
    expect((await person.client.get('/api/me')).body.decimalMark).toBe('point')
    const pond = await createPond(person.client)
    const fish = await createFish(person.client, pond.id, { name: 'Comma test' })

    const page = await chromium.context.newPage()
    await signIn(page, person.email, person.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('add-measurement').click()
    const form = page.getByTestId('entry-form')
    const weight = form.getByLabel('Weight', { exact: true })

    // "1,25" cannot be a thousands group: refused with the parser's message, nothing sent.
    await weight.fill('1,25')
    await weight.blur()
    await expect.poll(() => form.getByTestId('error-data.weightG').textContent()).toContain('Write 1.25 for a decimal')
    expect(await weight.getAttribute('aria-describedby')).toContain('data.weightG-error')
    await form.getByTestId('entry-submit').click()
    await expect.poll(() => form.getByRole('alert').first().textContent()).toContain('Some fields need attention')
    expect(await weightsOf(fish.id)).toEqual([])

    await weight.fill('1,250')
    await expect.poll(() => form.getByTestId('understood-data.weightG').textContent()).toContain('= 1,250 g')
    expect(await form.getByTestId('error-data.weightG').count()).toBe(0)
    await form.getByLabel('Length (cm)').fill('42')
    // 100 · 1250 / 42³ = 125000 / 74088 = 1.687 (Fulton; Nash et al. 2006).
    await expect.poll(() => form.getByTestId('measurement-preview').textContent()).toContain('Condition factor K (TL) 1.69')
    await screenshots(page, 'numbers-weight-understood')
    await form.getByTestId('entry-submit').click()
    await form.waitFor({ state: 'detached' })

    await expect.poll(() => page.getByTestId('entry-weight').first().textContent()).toBe('1,250 g (1.25 kg)')
    const stored = (await person.client.get(`/api/fish/${fish.id}/timeline?kind=measurement&limit=1`)).body.entries
    expect(stored[0].data.weightG).toBe(1250)
    expect(await weightsOf(fish.id)).toMatchObject([{ weightG: 1250 }])
    await page.close()
  })

  it('warns about an unlikely weight, saves it only with "Save anyway", and shows the warning on the entry', async () => {
    const person = await signedInUser({ name: 'Warned Keeper' })
    const pond = await createPond(person.client)
    const fish = await createFish(person.client, pond.id, { name: 'Jumpy', hatchYear: 2016 })
    const first = await person.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(7), data: { weightG: 1000 } })
    expect(first.status).toBe(201)

    const page = await chromium.context.newPage()
    await signIn(page, person.email, person.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('add-measurement').click()
    const form = page.getByTestId('entry-form')
    // 2.5 kg a week after 1 kg: +150 %, over the 30 % in 30 days (common practice).
    await form.getByLabel('Weight', { exact: true }).fill('2.5')
    await form.getByTestId('weight-unit-kg').click()
    await form.getByTestId('entry-submit').click()
    await expect.poll(() => form.getByTestId('entry-warning-weight_jump').textContent()).toMatch(/2\.50 kg is 150 % more than the 1\.00 kg weighed 7 days earlier/)
    expect(await weightsOf(fish.id)).toHaveLength(1)
    await screenshots(page, 'numbers-weight-warning')
    await form.getByTestId('entry-save-anyway').click()
    await form.waitFor({ state: 'detached' })
    await expect.poll(() => page.getByTestId('entry-stored-warnings').first().textContent()).toContain('Saved after a warning')
    const weights = await weightsOf(fish.id)
    expect(weights.map(w => w.weightG)).toEqual([1000, 2500])
    expect(weights[1]!.warnings!.map(w => w.code)).toEqual(['weight_jump'])
    await page.close()
  })
})
