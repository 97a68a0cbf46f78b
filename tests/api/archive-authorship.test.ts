import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_URL } from '../support/env'
import { addMember, createFish, createPond, signedInUser, uniqueEmail } from '../support/factories'
import { makeJpeg, tusUpload } from '../support/photos'
import { readZip, writeZip, type ZipContents } from '../support/zip'

// A name a spreadsheet would run as a formula, and a pond name starting with one of the formula characters.
const FISH_NAME = '=SUM(A1:A9)'
const POND_NAME = '@Home pond'

let source: { owner: Awaited<ReturnType<typeof signedInUser>>, vet: Awaited<ReturnType<typeof signedInUser>>, pondId: string }
let archive: ZipContents
let manifest: { exportedAt: string }

async function post(client: ApiClient, path: string, body: object, status = 201) {
  const response = await client.post(path, body)
  expect(response.status, JSON.stringify(response.body)).toBe(status)
  return response.body
}

async function importArchive(client: ApiClient, contents: ZipContents) {
  const response = await fetch(`${MAIN_URL}/api/ponds/import`, { method: 'POST', headers: { 'content-type': 'application/zip', 'cookie': client.cookieHeader() }, body: await writeZip(contents) })
  return { status: response.status, body: await response.json() as { pondId: string, message?: string, data?: { problems?: { file: string, line?: number, field?: string }[] } } }
}

/** The archive with one data file's lines changed and the manifest's checksum made to match. */
function withLines(contents: ZipContents, file: string, change: (record: Record<string, unknown>) => Record<string, unknown>) {
  const copy: ZipContents = new Map(contents)
  const text = contents.get(file)!.toString('utf8').split('\n').filter(Boolean).map(line => JSON.stringify(change(JSON.parse(line)))).join('\n') + '\n'
  copy.set(file, Buffer.from(text))
  const m = JSON.parse(contents.get('manifest.json')!.toString())
  m.files[file].sha256 = createHash('sha256').update(text).digest('hex')
  copy.set('manifest.json', Buffer.from(JSON.stringify(m)))
  return copy
}

const countUsers = async () => (await testDb().query('select count(*)::int as n from users')).rows[0].n as number

beforeAll(async () => {
  const owner = await signedInUser({ name: 'Source Owner' })
  const vet = await signedInUser({ name: 'Dr Real Vet' })
  const pond = await createPond(owner.client, { name: POND_NAME })
  await addMember(pond.id, vet.user.id, 'vet')
  const fish = await createFish(owner.client, pond.id, { name: FISH_NAME })
  expect((await owner.client.patch(`/api/fish/${fish.id}`, { features: 'White blaze on the head', version: fish.version })).status).toBe(200)
  const weighing = await post(owner.client, `/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: '2024-05-01', data: { weightG: 1500, lengthCm: 45, lengthType: 'total' } })
  const weighingId = weighing.id ?? weighing.entry?.id
  await post(owner.client, `/api/timeline/${weighingId}/amend`, { revision: 1, data: { weightG: 1510, lengthCm: 45, lengthType: 'total' }, reason: 'Read the scale again' }, 200)
  const note = await post(owner.client, `/api/fish/${fish.id}/timeline`, { kind: 'observation', occurredAt: '2024-06-01', data: { signs: [], text: 'Written on the wrong fish' } })
  await post(owner.client, `/api/timeline/${note.id ?? note.entry?.id}/entered-in-error`, { reason: 'Wrong fish' }, 200)
  await post(vet.client, `/api/fish/${fish.id}/timeline`, { kind: 'exam', occurredAt: '2025-06-02', data: { reason: 'Spring check', history: '', findings: [], assessment: 'Healthy', plan: '' } })
  const course = await post(vet.client, `/api/fish/${fish.id}/timeline`, {
    kind: 'treatment', occurredAt: '2025-06-02',
    data: { drug: 'Course drug', route: 'in_feed', dose: 30, doseUnit: 'mg/kg of feed', startOn: '2025-06-02', doseCount: 2, intervalHours: 24 },
  })
  await post(owner.client, `/api/timeline/${course.entry.id}/doses`, { doseNumber: 1, givenAt: '2025-06-02T18:00:00Z', note: '' })
  const uploaded = await tusUpload(MAIN_URL, owner.client, await makeJpeg({ width: 400, height: 300 }), { metadata: { fishId: fish.id, filename: 'head.jpg', view: 'top' } }).done
  expect(uploaded.headers['photo-state']).toBe('ready')
  source = { owner, vet, pondId: pond.id }
  const response = await fetch(`${MAIN_URL}/api/ponds/${pond.id}/export`, { headers: { cookie: owner.client.cookieHeader() } })
  expect(response.status).toBe(200)
  archive = await readZip(Buffer.from(await response.arrayBuffer()))
  manifest = JSON.parse(archive.get('manifest.json')!.toString())
}, 120_000)

afterAll(async () => {
  await closeTestDb()
})

describe('pond import keeps authors as the archive names them', () => {
  let importer: Awaited<ReturnType<typeof signedInUser>>
  let pondId: string
  let fishId: string
  let laterAddress: string
  let usersBefore: number

  beforeAll(async () => {
    importer = await signedInUser({ name: 'New Keeper Of The Pond' })
    // The owner's address in the archive belongs to nobody here yet: the import must not take it.
    laterAddress = uniqueEmail('later')
    const contents = withLines(archive, 'data/people.jsonl', p => (p.name === 'Source Owner' ? { ...p, email: laterAddress } : p))
    usersBefore = await countUsers()
    const imported = await importArchive(importer.client, contents)
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    pondId = imported.body.pondId
    const fish = (await importer.client.get(`/api/ponds/${pondId}/fish`)).body
    fishId = fish[0].id
  }, 60_000)

  it('creates no account, and a person named in the archive can still sign up with their address', async () => {
    expect(await countUsers()).toBe(usersBefore)
    await signedInUser({ name: 'Source Owner, later', email: laterAddress })
  })

  it('attributes nothing to a local account, not even to the person whose address the archive gives', async () => {
    const local = await testDb().query(`select
        (select count(*) from timeline_entries where pond_id = $1 and (author_id is not null or error_by_id is not null))::int as entries,
        (select count(*) from timeline_revisions r join timeline_entries e on e.id = r.entry_id where e.pond_id = $1 and r.author_id is not null)::int as revisions,
        (select count(*) from treatment_doses d join timeline_entries e on e.id = d.entry_id where e.pond_id = $1 and d.given_by_id is not null)::int as doses,
        (select count(*) from fish_edits x join fish f on f.id = x.fish_id where f.pond_id = $1 and x.user_id is not null)::int as edits,
        (select count(*) from photos p join fish f on f.id = p.fish_id where f.pond_id = $1 and p.uploader_id is not null)::int as photos`, [pondId])
    expect(local.rows[0]).toEqual({ entries: 0, revisions: 0, doses: 0, edits: 0, photos: 0 })
    // The real vet of the source pond is not made a member of the imported pond either.
    expect((await source.vet.client.get(`/api/ponds/${pondId}`)).status).toBe(404)
  })

  it('shows each entry as imported, with its author, their role then, the archive date and the importer', async () => {
    const page = (await importer.client.get(`/api/fish/${fishId}/timeline`)).body
    const exam = page.entries.find((e: { kind: string }) => e.kind === 'exam')
    const imported = { archiveMadeAt: manifest.exportedAt, importedBy: 'New Keeper Of The Pond', importedAt: expect.any(String) }
    expect(exam.author).toBeNull()
    expect(exam.imported).toEqual({ name: 'Dr Real Vet', role: 'vet', ...imported })
    // A clinical entry whose author is not here cannot be amended by anyone here.
    expect(exam.canAmend).toBe(false)
    const weighing = page.entries.find((e: { kind: string }) => e.kind === 'measurement')
    expect(weighing).toMatchObject({ author: null, imported: { name: 'Source Owner', role: 'owner' }, revision: 2, data: { weightG: 1510 } })
    const wrong = page.entries.find((e: { kind: string }) => e.kind === 'observation')
    expect(wrong).toMatchObject({ enteredInError: true, errorBy: 'Source Owner', errorReason: 'Wrong fish' })
    const course = page.entries.find((e: { kind: string }) => e.kind === 'treatment')
    expect(course.derived.schedule.slots[0]).toMatchObject({ state: 'given', given: { givenBy: { name: 'Source Owner' } } })
    const photo = page.entries.find((e: { kind: string }) => e.kind === 'photo')
    expect(photo).toMatchObject({ author: null, imported: { name: 'Source Owner' } })
    const revisions = (await importer.client.get(`/api/timeline/${weighing.id}/revisions`)).body
    expect(revisions.map((r: { author: { name: string, imported: boolean } }) => r.author)).toEqual([
      expect.objectContaining({ name: 'Source Owner', imported: true }), expect.objectContaining({ name: 'Source Owner', imported: true }),
    ])
    const history = (await importer.client.get(`/api/fish/${fishId}/history`)).body
    expect(history).toEqual([expect.objectContaining({ by: 'Source Owner', imported: true })])
    const photos = (await importer.client.get(`/api/fish/${fishId}/photos`)).body
    expect(photos.photos[0].uploaderName).toBe('Source Owner')
  })

  it('keeps a fish or pond name with formula characters exactly as data', async () => {
    const fish = (await importer.client.get(`/api/fish/${fishId}`)).body
    expect(fish.name ?? fish.fish?.name).toBe(FISH_NAME)
    expect((await importer.client.get(`/api/ponds/${pondId}`)).body.name).toBe(POND_NAME)
  })

  it('an owner may still mark an imported non-clinical entry entered in error; it is then theirs to answer for', async () => {
    const page = (await importer.client.get(`/api/fish/${fishId}/timeline`)).body
    const weighing = page.entries.find((e: { kind: string }) => e.kind === 'measurement')
    expect(weighing.canAmend).toBe(true)
    const marked = await post(importer.client, `/api/timeline/${weighing.id}/entered-in-error`, { reason: 'Scale broken in the old pond' }, 200)
    expect(marked).toMatchObject({ enteredInError: true, errorBy: 'New Keeper Of The Pond', imported: { name: 'Source Owner' } })
  })
})

describe('people in an archive are checked', () => {
  it('refuses a person whose e-mail is not an address, naming the line and field, and writes nothing', async () => {
    const importer = await signedInUser()
    const before = await testDb().query('select (select count(*)::int from ponds) as ponds, (select count(*)::int from archive_people) as people')
    const contents = withLines(archive, 'data/people.jsonl', p => (p.name === 'Dr Real Vet' ? { ...p, email: 'vet at the clinic' } : p))
    const refused = await importArchive(importer.client, contents)
    expect(refused.status).toBe(400)
    expect(refused.body.message).toMatch(/data\/people\.jsonl line \d+: email: Not an e-mail address/)
    expect(refused.body.data?.problems?.[0]).toMatchObject({ file: 'data/people.jsonl', line: expect.any(Number), field: 'email' })
    const after = await testDb().query('select (select count(*)::int from ponds) as ponds, (select count(*)::int from archive_people) as people')
    expect(after.rows[0]).toEqual(before.rows[0])
  })
})
