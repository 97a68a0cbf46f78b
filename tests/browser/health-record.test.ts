import { execFileSync } from 'node:child_process'
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { BrowserContext } from 'playwright-core'
import { openBrowser, screenshots, signIn } from '../support/browser'
import { pondWithRoles, testMicrochip } from '../support/factories'

let browser: BrowserContext

beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser?.close()
})

describe('printable health record', () => {
  it('prints to a PDF whose text holds the name, the microchip and the procedures', async () => {
    const world = await pondWithRoles()
    const chip = testMicrochip()
    const fish = (await world.owner.client.post(`/api/ponds/${world.pond.id}/fish`, { name: 'Lantern', species: 'koi', variety: 'Hariwake', hatchYear: 2015, microchip: chip })).body
    const post = async (body: object) => {
      const response = await world.vet.client.post(`/api/fish/${fish.id}/timeline`, body)
      expect(response.status, JSON.stringify(response.body)).toBe(201)
    }
    await post({ kind: 'measurement', occurredAt: '2025-04-01', data: { weightG: 2100, lengthCm: 52, lengthType: 'total' } })
    await post({ kind: 'measurement', occurredAt: '2026-04-01', data: { weightG: 2350, lengthCm: 54, lengthType: 'total' } })
    await post({ kind: 'procedure', occurredAt: '2026-05-02', data: { code: 'enucleation', name: 'enucleation', bodySite: 'eye', side: 'left', performedBy: 'Dr Test Vet', outcome: 'Recovered well' } })
    await post({ kind: 'procedure', occurredAt: '2026-06-10', data: { code: 'mass_removal', name: 'mass removal', bodySite: 'dorsal fin base', side: 'right', performedBy: 'Dr Test Vet', outcome: 'Margins clear' } })

    const page = await browser.newPage()
    await signIn(page, world.owner.email, world.owner.password)
    await page.goto(`/fish/${fish.id}`)
    await page.getByTestId('health-record-link').click()
    await page.getByTestId('record-procedures').waitFor()
    await screenshots(page, 'health-record')
    const pdf = join(mkdtempSync(join(tmpdir(), 'fintrail-record-')), 'record.pdf')
    await page.emulateMedia({ media: 'print' })
    await page.pdf({ path: pdf, format: 'A4', printBackground: true })
    const text = execFileSync('pdftotext', ['-layout', pdf, '-'], { encoding: 'utf8' })
    expect(text).toContain('Lantern')
    expect(text).toContain(chip)
    expect(text).toMatch(/enucleation/)
    expect(text).toMatch(/mass removal/)
    expect(text).toMatch(/left eye removed/i)
    expect(text).toMatch(/condition factor K\s+1\.49/)
    expect(text).not.toContain('Print or save as PDF')
    await page.close()
  })
})
