import { mkdtempSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { testDb } from '../support/db'
import { MAIN_URL } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'
import { tusUpload } from '../support/photos'
import { benchFish, referenceShots, renderShot, rotatedCroppedDarker } from '../../scripts/bench/which-fish-set'

const chromium = browserForFile()

describe('Which fish is this? in Chromium', () => {
  it('shows the likeliest fish beside a new photo, and confirming adds the photo to that fish', { timeout: 240_000 }, async () => {
    const owner = await signedInUser({ name: 'Recognising Owner' })
    const pond = await createPond(owner.client, { name: 'Look-alike pond' })
    // Drawn by the seed's pattern generator: the first two are a look-alike pair.
    const drawn = benchFish(3)
    const ids: string[] = []
    for (const [i, fish] of drawn.entries()) {
      const row = await createFish(owner.client, pond.id, { name: ['Amber', 'Bento', 'Cloud'][i], variety: fish.pattern.variety, species: fish.pattern.species })
      ids.push(row.id)
      for (const [j, shot] of referenceShots(fish, 2).entries()) {
        const { done } = tusUpload(MAIN_URL, owner.client, await renderShot(fish, shot), { metadata: { fishId: row.id, filename: `ref-${j}.jpg`, view: 'top' } })
        expect((await done).headers['photo-state']).toBe('ready')
      }
    }
    const newPhoto = join(mkdtempSync(join(tmpdir(), 'which-fish-')), 'at-the-pond.jpg')
    writeFileSync(newPhoto, await renderShot(drawn[1]!, rotatedCroppedDarker(drawn[1]!)))

    const page = await chromium.context.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/ponds/${pond.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('which-fish-open-panel').click()
    await page.getByTestId('which-fish-input').setInputFiles(newPhoto)
    const candidates = page.getByTestId('which-fish-candidates')
    await candidates.waitFor({ timeout: 60_000 })
    expect(await candidates.locator('li').first().textContent()).toContain('Bento')
    expect(await page.getByTestId('candidate-Bento').getByTestId('candidate-similarity').textContent()).toMatch(/Strong|Possible/)
    await screenshots(page, 'which-fish-candidates')

    await page.getByTestId('confirm-Bento').click()
    expect(await page.getByTestId('which-fish-add-photo').isChecked()).toBe(true)
    await page.getByTestId('which-fish-open').click()
    await page.waitForURL(`**/fish/${ids[1]}`, { timeout: 60_000 })
    await expect.poll(() => page.getByTestId('reference-photo-count').textContent()).toContain('3 photos from above')

    // This pond's fish only: a run before this one against the same database left its own 'at-the-pond.jpg'.
    const { rows } = await testDb().query(`select fish_id, view, original_name from photos where original_name = 'at-the-pond.jpg' and fish_id = any($1)`, [ids])
    expect(rows).toEqual([{ fish_id: ids[1], view: 'top', original_name: 'at-the-pond.jpg' }])
    await page.close()
  })
})
