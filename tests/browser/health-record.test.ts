import { execFileSync } from 'node:child_process'
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import type { Page } from 'playwright-core'
import { browserForFile, screenshots, signIn } from '../support/browser'
import { testDb } from '../support/db'
import { pondWithRoles, testMicrochip } from '../support/factories'
import { addEntry } from '../support/timeline'

const chromium = browserForFile()

/** Prints the page as Chromium does for "Save as PDF" and returns the PDF's text in reading order (poppler's pdftotext). */
async function printedText(page: Page) {
  const pdf = join(mkdtempSync(join(tmpdir(), 'fintrail-record-')), 'record.pdf')
  await page.emulateMedia({ media: 'print' })
  await page.pdf({ path: pdf, format: 'A4', printBackground: true, margin: { top: '12mm', bottom: '12mm', left: '12mm', right: '12mm' } })
  const text = execFileSync('pdftotext', [pdf, '-'], { encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 })
  const pages = Number(/Pages:\s+(\d+)/.exec(execFileSync('pdfinfo', [pdf], { encoding: 'utf8' }))![1])
  return { text, pages }
}

describe('printable health record', () => {
  it('prints identity, people, key facts, every clinical entry with intervals and anaesthesia, and says it is complete', async () => {
    const world = await pondWithRoles()
    const chip = testMicrochip()
    const fish = (await world.owner.client.post(`/api/ponds/${world.pond.id}/fish`, { name: 'Lantern', species: 'koi', variety: 'Hariwake', hatchYear: 2015, microchip: chip })).body
    await addEntry(world.vet.client, fish.id, { kind: 'measurement', occurredAt: '2025-04-01', data: { weightG: 2100, lengthCm: 52, lengthType: 'total' } })
    await addEntry(world.vet.client, fish.id, { kind: 'measurement', occurredAt: '2026-04-01', data: { weightG: 2350, lengthCm: 54, lengthType: 'total' } })
    await addEntry(world.vet.client, fish.id, {
      kind: 'exam', occurredAt: '2026-04-20',
      data: { reason: 'Spring health check', findings: [{ system: 'eyes', state: 'abnormal', note: 'Mass behind the left eye' }], assessment: 'Retrobulbar mass', plan: 'Enucleation' },
    })
    await addEntry(world.vet.client, fish.id, {
      kind: 'lab_result', occurredAt: '2026-04-22',
      data: { panel: 'haematology', analytes: [{ name: 'Packed cell volume', value: 22, unit: '%', low: 24, high: 43 }], intervalSource: 'Tripathi et al. 2004 (koi)' },
    })
    const anaesthesia = await addEntry(world.vet.client, fish.id, {
      kind: 'anaesthesia', occurredAt: '2026-05-02',
      data: { agent: 'MS-222 (tricaine methanesulfonate)', concentrationMgL: 100, buffer: 'sodium bicarbonate', waterTemperatureC: 18, inductionMinutes: 4, recoveryMinutes: 41 },
    })
    await addEntry(world.vet.client, fish.id, { kind: 'procedure', occurredAt: '2026-05-02', data: { code: 'enucleation', name: 'enucleation', bodySite: 'eye', side: 'left', performedBy: 'Dr Test Vet', outcome: 'Recovered well', anaesthesiaEntryId: anaesthesia.entry.id } })
    await addEntry(world.vet.client, fish.id, { kind: 'procedure', occurredAt: '2026-06-10', data: { code: 'mass_removal', name: 'mass removal', bodySite: 'dorsal fin base', side: 'right', performedBy: 'Dr Test Vet', outcome: 'Margins clear' } })

    const page = await chromium.context.newPage()
    await signIn(page, world.owner.email, world.owner.password)
    await page.goto(`/fish/${fish.id}`, { waitUntil: 'networkidle' })
    await page.getByTestId('health-record-link').click()
    await expect.poll(() => page.getByTestId('record-completeness').getAttribute('data-complete'), { timeout: 60_000 }).toBe('true')
    await screenshots(page, 'health-record')
    expect(await page.getByTestId('record-entry-anaesthesia').count()).toBe(1)

    const { text } = await printedText(page)
    const flat = text.replace(/\s+/g, ' ')
    expect(flat).toContain('Lantern')
    expect(flat).toContain(chip)
    expect(flat).toContain('Treated by')
    expect(flat).toMatch(/Vet \(5 entries, 20 Apr 2026 – 10 Jun 2026\)/)
    expect(flat).toMatch(/Key facts/i)
    expect(flat).not.toMatch(/standing facts/i)
    expect(flat).toMatch(/left eye removed/i)
    expect(flat).toMatch(/Condition factor K \(TL\) 1\.49/)
    expect(flat).toMatch(/Spring health check/)
    expect(flat).toMatch(/Packed cell volume 22 %/)
    expect(flat).toMatch(/24–43/)
    expect(flat).toContain('Intervals: Tripathi et al. 2004 (koi)')
    expect(flat).toMatch(/MS-222/)
    expect(flat).toMatch(/enucleation/i)
    expect(flat).toMatch(/mass removal/i)
    expect(flat).toMatch(/Weight \((kg|g)\)/)
    expect(flat).toMatch(/Complete record: all 7 entries written up to/)
    expect(flat).not.toContain('Print or save as PDF')
    await page.close()
  })

  it('prints all 5,000 entries of a fish with twenty years of history, the oldest included', { timeout: 240_000 }, async () => {
    const world = await pondWithRoles()
    const fish = (await world.owner.client.post(`/api/ponds/${world.pond.id}/fish`, { name: 'Methuselah', species: 'koi', variety: 'Chagoi', hatchYear: 2005 })).body
    // Twenty years, 2006–2025, of a busy fish: weighings, notes, exams, lab results, procedures with
    // anaesthesia and treatments, every 35 hours, written straight into the tables with their first revision.
    await testDb().query(`
      with made as (
        insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
        select $1, $2, (array['measurement','observation','exam','lab_result','anaesthesia','treatment','observation','measurement'])[1 + i % 8]::timeline_kind,
          timestamptz '2006-01-02 09:00Z' + ((i - 1) * interval '35 hours'), case when i % 8 in (2, 3, 4, 5) then $4 else $3 end::uuid,
          case
            when i % 8 in (0, 7) then jsonb_build_object('weightG', 40 + i, 'lengthCm', 14 + i / 100.0, 'lengthType', 'total')
            when i % 8 in (1, 6) then jsonb_build_object('signs', jsonb_build_array('eating_well'), 'text', 'Daily note ' || i)
            when i % 8 = 2 then jsonb_build_object('reason', 'Check ' || i, 'findings', '[]'::jsonb, 'assessment', 'Healthy')
            when i % 8 = 3 then jsonb_build_object('panel', 'haematology', 'analytes', jsonb_build_array(jsonb_build_object('name', 'Packed cell volume', 'value', 30, 'unit', '%', 'low', 24, 'high', 43)), 'intervalSource', 'Tripathi et al. 2004')
            when i % 8 = 4 then jsonb_build_object('agent', 'MS-222 (tricaine methanesulfonate)', 'concentrationMgL', 100, 'buffer', 'sodium bicarbonate', 'recoveryMinutes', 12)
            else jsonb_build_object('drug', 'Salt (sodium chloride)', 'route', 'tank_bath', 'dose', 3, 'doseUnit', 'g/L', 'startOn', '2006-01-02', 'durationDays', 3)
          end
        from generate_series(1, 4999) i
        returning id, occurred_at, data, author_id
      )
      insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
      select id, 1, occurred_at, data, author_id from made`, [fish.id, world.pond.id, world.keeper.user.id, world.vet.user.id])
    // The oldest entry of all, dated before the generated ones: the print must reach back to it.
    await addEntry(world.keeper.client, fish.id, { kind: 'observation', occurredAt: '2006-01-01', data: { signs: [], text: 'First day in the pond: bought as a tosai at the spring auction' } })

    const page = await chromium.context.newPage()
    await signIn(page, world.owner.email, world.owner.password)
    await page.goto(`/fish/${fish.id}/record`, { timeout: 60_000 })
    const completeness = page.getByTestId('record-completeness')
    await completeness.waitFor({ timeout: 60_000 })
    await expect.poll(() => completeness.getAttribute('data-complete'), { timeout: 120_000 }).toBe('true')
    await expect(page.getByTestId('record-completeness').textContent()).resolves.toMatch(/Complete record: all 5,000 entries written up to/)

    const { text, pages } = await printedText(page)
    const flat = text.replace(/\s+/g, ' ')
    expect(flat).toContain('First day in the pond: bought as a tosai at the spring auction')
    expect(flat).toMatch(/Complete record: all 5,000 entries written up to/)
    expect(flat).toContain('Daily note 4998')
    // Compact: 5,000 entries fit in a few hundred pages, not thousands.
    console.log(`5,000-entry health record: ${pages} A4 pages`)
    expect(pages).toBeLessThan(400)
    await page.close()
  })
})
