import { writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { testDb } from '../support/db'
import { createFish, pondWithRoles } from '../support/factories'

const chromium = browserForFile()

describe('importing a spreadsheet of weights in Chromium', () => {
  it('a keeper maps the columns, sees the rows that cannot be read, and imports the rest', async () => {
    const { owner, keeper, pond } = await pondWithRoles()
    const fish = await createFish(owner.client, pond.id, { name: 'Tsuki' })
    const file = join(tmpdir(), `weigh-ins-${Date.now()}.csv`)
    writeFileSync(file, 'Koi,Date,Weight (kg),Length (cm)\nTsuki,2024-05-01,1.2,40\nTsuki,2024-06-01,1.25,41\nGhost,2024-06-01,1.3,42\n')

    const page = await chromium.context.newPage()
    await signIn(page, keeper.email, keeper.password)
    await page.goto(`/ponds/${pond.id}/settings`, { waitUntil: 'networkidle' })
    await page.getByTestId('import-link').click()
    await page.waitForURL(url => url.pathname.endsWith('/import'))
    await page.waitForLoadState('networkidle')
    await page.getByTestId('import-file').setInputFiles(file)
    await page.getByTestId('import-mapping').waitFor()
    // The suggestion fills the columns; the units are the person's to choose.
    expect(await page.getByLabel('Fish column').inputValue()).toBe('Koi')
    await page.getByLabel('weight unit', { exact: true }).selectOption('kg')
    await page.getByTestId('import-preview').click()
    await expect.poll(() => page.getByTestId('import-problems').textContent()).toContain('No fish named "Ghost" in this pond')
    await screenshots(page, 'measurement-import-preview')
    const { rows: before } = await testDb().query(`select count(*)::int as n from timeline_entries where fish_id = $1`, [fish.id])
    expect(before[0].n).toBe(0)
    await page.getByTestId('import-submit').click()
    await expect.poll(() => page.getByTestId('import-report').first().textContent()).toContain('2 of 3 rows imported')
    const { rows } = await testDb().query(`select data from timeline_entries where fish_id = $1 and kind = 'measurement' order by occurred_at`, [fish.id])
    expect(rows.map(r => r.data.weightG)).toEqual([1200, 1250])
    await page.close()
  })
})
