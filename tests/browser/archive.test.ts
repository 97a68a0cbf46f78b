import { describe, expect, it } from 'vitest'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { MAIN_URL } from '../support/env'
import { addMember, createFish, createPond, signedInUser } from '../support/factories'

const chromium = browserForFile()

describe('a pond archive seen by the people who use it', () => {
  it('offers to keep photo locations only when ticked, with the reason beside it', async () => {
    const owner = await signedInUser({ name: 'Archive Screen Owner' })
    const pond = await createPond(owner.client, { name: 'Pond to download' })
    const page = await chromium.context.newPage()
    await signIn(page, owner.email, owner.password)
    await page.goto(`/ponds/${pond.id}/settings`, { waitUntil: 'networkidle' })
    const keep = page.getByTestId('export-keep-location')
    expect(await keep.isChecked()).toBe(false)
    await expect.poll(() => page.getByTestId('export-pond').getAttribute('href')).toBe(`/api/ponds/${pond.id}/export`)
    expect(await page.locator('#export-location-reason').textContent()).toMatch(/where the pond, and so perhaps your home, is/)
    await keep.check()
    await expect.poll(() => page.getByTestId('export-pond').getAttribute('href')).toBe(`/api/ponds/${pond.id}/export?keepLocation=true`)
    await page.getByTestId('export-pond').scrollIntoViewIfNeeded()
    await screenshots(page, 'archive-export-choice')
    await page.close()
  })

  it('shows an imported exam as recorded by the archive’s vet, with the archive date and the importer', async () => {
    const owner = await signedInUser({ name: 'Old Pond Owner' })
    const vet = await signedInUser({ name: 'Dr Orla Finch' })
    const pond = await createPond(owner.client, { name: 'Old pond' })
    await addMember(pond.id, vet.user.id, 'vet')
    const fish = await createFish(owner.client, pond.id, { name: 'Juniper' })
    const exam = await vet.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'exam', occurredAt: '2025-06-02', data: { reason: 'Spring check', history: '', findings: [], assessment: 'Healthy', plan: '' } })
    expect(exam.status).toBe(201)
    const exported = await fetch(`${MAIN_URL}/api/ponds/${pond.id}/export`, { headers: { cookie: owner.client.cookieHeader() } })
    const importer = await signedInUser({ name: 'Nina New-Home' })
    const imported = await fetch(`${MAIN_URL}/api/ponds/import`, { method: 'POST', headers: { 'content-type': 'application/zip', 'cookie': importer.client.cookieHeader() }, body: Buffer.from(await exported.arrayBuffer()) })
    expect(imported.status).toBe(201)
    const { pondId } = await imported.json() as { pondId: string }
    const [copy] = (await importer.client.get(`/api/ponds/${pondId}/fish`)).body

    const page = await chromium.context.newPage()
    await signIn(page, importer.email, importer.password)
    await page.goto(`/fish/${copy.id}`, { waitUntil: 'networkidle' })
    const line = page.getByTestId('entry-exam').getByTestId('imported-author')
    const words = (await line.textContent())!.replace(/\s+/g, ' ').trim()
    expect(words).toMatch(/^Imported — recorded by Dr Orla Finch \(vet\), from a pond archive made on \d{1,2} \w{3} \d{4}, imported by Nina New-Home$/)
    await page.getByTestId('entry-exam').scrollIntoViewIfNeeded()
    await screenshots(page, 'archive-imported-entry')
    await page.close()
  })
})
