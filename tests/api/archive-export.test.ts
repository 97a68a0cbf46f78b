import exifr from 'exifr'
import Papa from 'papaparse'
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import type { ApiClient } from '../support/client'
import { MAIN_URL } from '../support/env'
import { addMember, createFish, createPond, signedInUser, testMicrochip } from '../support/factories'
import { makeJpeg, tusUpload } from '../support/photos'
import { testStorage } from '../support/stored-files'
import { readZip, writeZip, type ZipContents } from '../support/zip'

// Names a spreadsheet would run as formulas if written plainly (OWASP "CSV Injection").
const FORMULA_NAME = '=HYPERLINK("http://example.test/x","Koi")'
const AT_NAME = '@Bubbles'
const POND_NAME = '+Pond by the wall'

let owner: Awaited<ReturnType<typeof signedInUser>>
let pondId: string
let chip: string
let originalPhoto: Buffer
let archive: ZipContents

async function post(client: ApiClient, fishId: string, body: object) {
  const response = await client.post(`/api/fish/${fishId}/timeline`, body)
  expect(response.status, JSON.stringify(response.body)).toBe(201)
  return response.body
}

async function exportPond(client: ApiClient, id: string, query = '') {
  // A hung export fails here rather than stalling the run.
  const response = await fetch(`${MAIN_URL}/api/ponds/${id}/export${query}`, { headers: { cookie: client.cookieHeader() }, signal: AbortSignal.timeout(30_000) })
  expect(response.status).toBe(200)
  return readZip(Buffer.from(await response.arrayBuffer()))
}

async function uploadPhoto(client: ApiClient, fishId: string, bytes: Buffer, filename: string) {
  const uploaded = await tusUpload(MAIN_URL, client, bytes, { metadata: { fishId, filename, view: 'top' } }).done
  expect(uploaded.headers['photo-state']).toBe('ready')
  return uploaded.headers['photo-id']!
}

function csv(contents: ZipContents, name: string) {
  const text = contents.get(name)?.toString('utf8')
  expect(text, `${name} is in the archive`).toBeDefined()
  const parsed = Papa.parse<Record<string, string>>(text!.replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: true })
  expect(parsed.errors).toEqual([])
  return parsed
}

const lines = (contents: ZipContents, name: string) => contents.get(name)!.toString('utf8').split('\n').filter(Boolean).map(l => JSON.parse(l))

beforeAll(async () => {
  owner = await signedInUser({ name: 'Export Owner' })
  const vet = await signedInUser({ name: 'Export Vet' })
  const pond = await createPond(owner.client, { name: POND_NAME })
  pondId = pond.id
  await addMember(pondId, vet.user.id, 'vet')
  chip = testMicrochip()
  const koi = await createFish(owner.client, pondId, { name: FORMULA_NAME, microchip: chip })
  await createFish(owner.client, pondId, { name: AT_NAME, species: 'goldfish', variety: 'Comet' })
  await post(owner.client, koi.id, { kind: 'measurement', occurredAt: '2024-05-01', data: { weightG: 1500, lengthCm: 45, lengthType: 'total' } })
  await post(vet.client, koi.id, {
    kind: 'exam', occurredAt: '2025-06-02',
    data: { reason: 'Spring check', history: '', findings: [{ system: 'skin', state: 'abnormal', note: 'Ulcer on the left flank' }, { system: 'gills', state: 'normal', note: '' }], assessment: 'Ulcer healing', plan: '-Recheck in two weeks' },
  })
  await post(vet.client, koi.id, {
    kind: 'lab_result', occurredAt: '2025-06-03',
    data: { panel: 'haematology', laboratory: 'Test bench', sample: 'Blood', intervalSource: 'common practice', analytes: [{ name: 'PCV', value: 32, unit: '%', low: 25, high: 45 }], organisms: [], findings: '' },
  })
  const course = await post(vet.client, koi.id, {
    kind: 'treatment', occurredAt: '2025-06-02',
    data: { drug: 'Course drug', route: 'in_feed', dose: 30, doseUnit: 'mg/kg of feed', startOn: '2025-06-02', doseCount: 2, intervalHours: 24 },
  })
  expect((await owner.client.post(`/api/timeline/${course.entry.id}/doses`, { doseNumber: 1, givenAt: '2025-06-02T18:00:00Z', note: '=1+1' })).status).toBe(201)
  // A phone photo: GPS position, camera make and a sideways orientation.
  originalPhoto = await makeJpeg({ width: 800, height: 600, gps: true, orientation: 6 })
  expect((await exifr.gps(originalPhoto))?.latitude).toBeCloseTo(51.5, 3)
  await uploadPhoto(owner.client, koi.id, originalPhoto, 'by-the-pond.jpg')
  archive = await exportPond(owner.client, pondId)
}, 120_000)

describe('photo originals in the archive', () => {
  it('have GPS removed without re-encoding: same pixels, orientation and camera tags kept', async () => {
    const [name] = [...archive.keys()].filter(n => n.startsWith('photos/'))
    const exported = archive.get(name!)!
    expect(await exifr.gps(exported)).toBeUndefined()
    const tags = await exifr.parse(exported, { gps: true, xmp: true, iptc: true, translateValues: false })
    expect(Object.keys(tags ?? {}).filter(k => /gps|latitude|longitude/i.test(k))).toEqual([])
    expect(tags).toMatchObject({ Make: 'Fintrail Test Camera', Orientation: 6 })
    const [before, after] = await Promise.all([originalPhoto, exported].map(b => sharp(b).raw().toBuffer({ resolveWithObject: true })))
    expect(after!.info).toMatchObject({ width: 800, height: 600 })
    expect(after!.data.equals(before!.data)).toBe(true)
    // The record carries the checksum of the bytes in the archive, so an import accepts them.
    const [record] = lines(archive, 'data/photos.jsonl')
    expect(record.bytes).toBe(exported.length)
    expect(JSON.parse(archive.get('manifest.json')!.toString())).toMatchObject({ photoLocation: 'removed', missingPhotos: [], missingPhotoCount: 0 })
  })

  it('keep the location only when the owner asks for it', async () => {
    const kept = await exportPond(owner.client, pondId, '?keepLocation=true')
    const [name] = [...kept.keys()].filter(n => n.startsWith('photos/'))
    expect((await exifr.gps(kept.get(name!)!))?.latitude).toBeCloseTo(51.5, 3)
    expect(JSON.parse(kept.get('manifest.json')!.toString()).photoLocation).toBe('kept')
    expect((await owner.client.get(`/api/ponds/${pondId}/export?keepLocation=maybe`)).status).toBe(400)
  })
})

describe('CSV files in the archive', () => {
  it('escape cells a spreadsheet would run as a formula, and keep the JSON Lines exactly as written', () => {
    const fish = csv(archive, 'csv/fish.csv').data
    expect(fish.map(f => f.name).sort()).toEqual([`'${AT_NAME}`, `'${FORMULA_NAME}`].sort())
    expect(csv(archive, 'csv/entries-exam.csv').data[0]!.plan).toBe('\'-Recheck in two weeks')
    expect(csv(archive, 'csv/treatment-doses.csv').data[0]!.note).toBe('\'=1+1')
    // Negative numbers are numbers, not formulas: no apostrophe in front of them.
    expect(lines(archive, 'data/fish.jsonl').map(f => f.name).sort()).toEqual([AT_NAME, FORMULA_NAME].sort())
    expect(JSON.parse(archive.get('manifest.json')!.toString()).pond.name).toBe(POND_NAME)
  })

  it('put the fish name and microchip beside the fish id, the author, and dates a spreadsheet reads as dates', () => {
    const { data, meta } = csv(archive, 'csv/timeline.csv')
    expect(meta.fields!.slice(0, 8)).toEqual(['entry_id', 'fish_id', 'fish_name', 'microchip', 'occurred_at_utc', 'kind', 'author', 'author_role'])
    const exam = data.find(r => r.kind === 'exam')!
    expect(exam).toMatchObject({ fish_name: `'${FORMULA_NAME}`, microchip: chip, author: 'Export Vet', author_role: 'vet', entered_in_error: 'FALSE' })
    expect(exam.occurred_at_utc).toMatch(/^2025-06-02 \d{2}:\d{2}:\d{2}$/)
    expect(exam.details).toContain('assessment: Ulcer healing')
    const dose = csv(archive, 'csv/treatment-doses.csv').data[0]!
    expect(dose).toMatchObject({ given_at_utc: '2025-06-02 18:00:00', given_by: 'Export Owner', dose_number: '1', drug: 'Course drug', microchip: chip })
    expect(csv(archive, 'csv/fish.csv').data.find(f => f.microchip === chip)!.recorded_at_utc).toMatch(/^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}$/)
  })

  it('flatten each kind\'s details into columns of its own file, and lists into a file with one row per item', () => {
    const measurement = csv(archive, 'csv/entries-measurement.csv')
    expect(measurement.meta.fields).toEqual(expect.arrayContaining(['weightG', 'lengthCm', 'lengthType', 'entered.weight']))
    expect(measurement.data[0]).toMatchObject({ weightG: '1500', lengthCm: '45', lengthType: 'total', fish_name: `'${FORMULA_NAME}`, microchip: chip, author: 'Export Owner' })
    const findings = csv(archive, 'csv/entries-exam-findings.csv').data
    expect(findings).toEqual(expect.arrayContaining([
      expect.objectContaining({ system: 'skin', state: 'abnormal', note: 'Ulcer on the left flank', microchip: chip }),
      expect.objectContaining({ system: 'gills', state: 'normal' }),
    ]))
    expect(csv(archive, 'csv/entries-lab-result-analytes.csv').data).toEqual([expect.objectContaining({ name: 'PCV', value: '32', unit: '%', low: '25', high: '45' })])
    expect(csv(archive, 'csv/entries-treatment.csv').data[0]).toMatchObject({ drug: 'Course drug', doseCount: '2', intervalHours: '24', startOn: '2025-06-02' })
    expect(csv(archive, 'csv/photos.csv').data[0]).toMatchObject({ fish_name: `'${FORMULA_NAME}`, uploaded_by: 'Export Owner' })
  })
})

describe('a ready photo whose original is gone', () => {
  it('is left out and listed in the manifest; the export answers and the archive still imports', async () => {
    const pond = await createPond(owner.client, { name: 'Pond with a lost photo' })
    const fish = await createFish(owner.client, pond.id, { name: 'Lost and found' })
    const kept = await uploadPhoto(owner.client, fish.id, await makeJpeg({ width: 400, height: 300, sigma: 10 }), 'kept.jpg')
    const lost = await uploadPhoto(owner.client, fish.id, await makeJpeg({ width: 400, height: 300, sigma: 30 }), 'lost.jpg')
    expect((await owner.client.post(`/api/fish/${fish.id}/profile-photo`, { photoId: lost })).status).toBe(200)
    await testStorage().remove(`photos/originals/${lost}`)

    const contents = await exportPond(owner.client, pond.id)
    const manifest = JSON.parse(contents.get('manifest.json')!.toString())
    expect(manifest.missingPhotos).toEqual([{ id: lost, fishId: fish.id, originalName: 'lost.jpg', note: expect.stringMatching(/not found in storage.*left out/) }])
    expect(manifest.counts.photos).toBe(1)
    expect(lines(contents, 'data/photos.jsonl').map(p => p.id)).toEqual([kept])
    expect([...contents.keys()].filter(n => n.startsWith('photos/'))).toHaveLength(1)
    expect(lines(contents, 'data/fish.jsonl')[0].profilePhotoId).toBeNull()

    const response = await fetch(`${MAIN_URL}/api/ponds/import`, { method: 'POST', headers: { 'content-type': 'application/zip', 'cookie': owner.client.cookieHeader() }, body: await writeZip(contents) })
    expect(response.status, await response.clone().text()).toBe(201)
  }, 60_000)
})
