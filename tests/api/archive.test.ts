import { spawnSync } from 'node:child_process'
import { createHash } from 'node:crypto'
import { join } from 'node:path'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb } from '../support/db'
import { MAIN_PORT, MAIN_URL, ROOT, testEnv } from '../support/env'
import { addMember, createFish, createPond, signedInUser, testMicrochip } from '../support/factories'
import { makeJpeg, tusUpload } from '../support/photos'
import { startServer, type RunningServer } from '../support/server'
import { otherStorage, storedNames } from '../support/stored-files'
import { declareSize, readZip, renameEntry, writeZip, type ZipContents } from '../support/zip'

// A second Fintrail: its own database in the test cluster and its own storage folder.
const OTHER_DB = 'fintrail_test_other'
const otherStore = otherStorage(join(testEnv().storageDir, '..', 'test-other'))
let other: RunningServer
let source: Awaited<ReturnType<typeof buildSourcePond>>
let archive: Buffer

function adminUrl(database: string) {
  const url = new URL(testEnv().databaseUrl)
  url.username = 'postgres'
  url.pathname = `/${database}`
  return url.toString()
}

async function buildSourcePond() {
  const owner = await signedInUser({ name: 'Archive Owner' })
  const keeper = await signedInUser({ name: 'Archive Keeper' })
  const vet = await signedInUser({ name: 'Archive Vet' })
  const pond = await createPond(owner.client, { name: 'Archive pond', volumeLitres: 12000, notes: 'Deep end by the wall' })
  await addMember(pond.id, keeper.user.id, 'keeper')
  await addMember(pond.id, vet.user.id, 'vet')
  const chip = testMicrochip()
  const fish = await createFish(owner.client, pond.id, { name: 'Ember', microchip: chip, variety: 'Showa' })
  const companion = await createFish(owner.client, pond.id, { name: 'Drift', species: 'goldfish', variety: 'Comet' })
  await keeper.client.patch(`/api/fish/${fish.id}`, { features: 'Scar above the left eye', version: fish.version })
  const post = (client: ApiClient, fishId: string, body: object) => client.post(`/api/fish/${fishId}/timeline`, body).then((r) => {
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    return r.body
  })
  await post(keeper.client, fish.id, { kind: 'measurement', occurredAt: '2024-05-01', data: { weightG: 1500, lengthCm: 45, lengthType: 'total' } })
  const wrong = await post(keeper.client, fish.id, { kind: 'measurement', occurredAt: '2025-05-01', data: { weightG: 150, lengthCm: 47, lengthType: 'total' }, acknowledgedWarnings: ['condition_factor'] })
  const wrongId = wrong.id ?? wrong.entry?.id
  expect((await keeper.client.post(`/api/timeline/${wrongId}/entered-in-error`, { reason: 'Scale read in the wrong unit' })).status).toBe(200)
  await post(vet.client, fish.id, { kind: 'exam', occurredAt: '2025-06-02', data: { reason: 'Spring check', history: '', findings: [], assessment: 'Healthy', plan: 'Recheck next spring' } })
  // A course of two doses, the first ticked off by the keeper: the doses travel with the entry.
  const course = await post(vet.client, fish.id, {
    kind: 'treatment', occurredAt: '2025-06-02',
    data: { drug: 'Course drug', route: 'in_feed', dose: 30, doseUnit: 'mg/kg of feed', startOn: '2025-06-02', doseCount: 2, intervalHours: 24 },
  })
  const dose = await keeper.client.post(`/api/timeline/${course.entry.id}/doses`, { doseNumber: 1, givenAt: '2025-06-02T18:00:00Z', note: 'With the evening feed' })
  expect(dose.status, JSON.stringify(dose.body)).toBe(201)
  const upload = tusUpload(MAIN_URL, owner.client, await makeJpeg({ width: 800, height: 600 }), { metadata: { fishId: fish.id, filename: 'ember.jpg', view: 'top' } })
  const uploaded = await upload.done
  expect(uploaded.headers['photo-state']).toBe('ready')
  return { owner, keeper, vet, pond, fish, companion, chip }
}

const ID_FIELDS = new Set(['id', 'ref', 'fishId', 'relatedFishId', 'linkedEntryId', 'photoId', 'profilePhotoId', 'by', 'author', 'uploader', 'errorBy', 'givenBy', 'file'])

/** The archive's records with ids replaced by what they point at, so two archives of the same pond compare equal. */
function normalise(contents: ZipContents) {
  const lines = (name: string) => contents.get(name)!.toString('utf8').split('\n').filter(Boolean).map(l => JSON.parse(l))
  const people = new Map(lines('data/people.jsonl').map(p => [p.ref, p.email]))
  const fishNames = new Map(lines('data/fish.jsonl').map(f => [f.id, f.name]))
  const photoHashes = new Map(lines('data/photos.jsonl').map(p => [p.id, p.sha256]))
  const resolve = (value: Record<string, unknown>): Record<string, unknown> => Object.fromEntries(Object.entries(value).map(([key, v]) => {
    if (Array.isArray(v)) return [key, v.map(item => (item && typeof item === 'object' ? resolve(item) : item))]
    if (!ID_FIELDS.has(key) || v === null) return [key, v]
    return [key, people.get(v as string) ?? fishNames.get(v as string) ?? photoHashes.get(v as string) ?? (key === 'file' ? 'photo file' : 'an entry')]
  }))
  const sorted = (name: string) => lines(name).map(resolve).map(r => JSON.stringify(r)).sort()
  return {
    people: sorted('data/people.jsonl'),
    fish: sorted('data/fish.jsonl'),
    edits: sorted('data/fish-edits.jsonl'),
    timeline: sorted('data/timeline.jsonl'),
    photos: sorted('data/photos.jsonl'),
    photoBytes: [...contents].filter(([name]) => name.startsWith('photos/')).map(([, b]) => createHash('sha256').update(b).digest('hex')).sort(),
  }
}

async function importInto(server: RunningServer, client: ApiClient, bytes: Buffer) {
  const response = await fetch(`${server.url}/api/ponds/import`, { method: 'POST', headers: { 'content-type': 'application/zip', 'cookie': client.cookieHeader() }, body: bytes })
  return { status: response.status, body: await response.json() as { pondId: string, message?: string } }
}

async function countRows(url: string) {
  const client = new pg.Client({ connectionString: url })
  await client.connect()
  const { rows } = await client.query('select (select count(*)::int from ponds) as ponds, (select count(*)::int from fish) as fish, (select count(*)::int from timeline_entries) as entries, (select count(*)::int from photos) as photos')
  await client.end()
  return rows[0]
}

beforeAll(async () => {
  const admin = new pg.Client({ connectionString: adminUrl('postgres') })
  await admin.connect()
  await admin.query(`drop database if exists ${OTHER_DB} with (force)`)
  await admin.query(`create database ${OTHER_DB} owner fintrail`)
  await admin.end()
  const otherUrl = testEnv().databaseUrl.replace(/\/[^/]+$/, `/${OTHER_DB}`)
  const migrated = spawnSync(join(ROOT, 'node_modules/.bin/tsx'), ['scripts/migrate.ts'], { cwd: ROOT, env: { ...process.env, DATABASE_URL: otherUrl }, encoding: 'utf8' })
  expect(migrated.status, migrated.stderr).toBe(0)
  other = await startServer(MAIN_PORT + 18, { NUXT_DATABASE_URL: otherUrl, ...otherStore.env })
  source = await buildSourcePond()
  const response = await fetch(`${MAIN_URL}/api/ponds/${source.pond.id}/export`, { headers: { cookie: source.owner.client.cookieHeader() } })
  expect(response.status).toBe(200)
  expect(response.headers.get('content-type')).toBe('application/zip')
  archive = Buffer.from(await response.arrayBuffer())
}, 120_000)

afterAll(async () => {
  await other?.stop()
  await closeTestDb()
})

describe('pond archive export', () => {
  it('is for owners only', async () => {
    expect((await source.keeper.client.get(`/api/ponds/${source.pond.id}/export`)).status).toBe(403)
    expect((await source.vet.client.get(`/api/ponds/${source.pond.id}/export`)).status).toBe(403)
    expect((await (await signedInUser()).client.get(`/api/ponds/${source.pond.id}/export`)).status).toBe(404)
    expect((await new ApiClient().get(`/api/ponds/${source.pond.id}/export`)).status).toBe(401)
  })

  it('holds a manifest with its schema version, JSON Lines and CSV per kind of record, and the photo originals', async () => {
    const contents = await readZip(archive)
    const manifest = JSON.parse(contents.get('manifest.json')!.toString())
    expect(manifest).toMatchObject({ format: 'fintrail-pond-archive', schemaVersion: 1, pond: { name: 'Archive pond', volumeLitres: 12000 }, counts: { fish: 2, photos: 1, fishEdits: 1, timeline: 4 } })
    for (const name of ['data/people.jsonl', 'data/fish.jsonl', 'data/fish-edits.jsonl', 'data/timeline.jsonl', 'data/photos.jsonl']) {
      expect(createHash('sha256').update(contents.get(name)!).digest('hex'), name).toBe(manifest.files[name].sha256)
    }
    expect(contents.get('csv/fish.csv')!.toString()).toContain(source.chip)
    expect(contents.get('csv/entries-measurement.csv')!.toString()).toMatch(/,1500,45,total,/)
    const photos = [...contents.keys()].filter(name => name.startsWith('photos/'))
    expect(photos).toHaveLength(1)
    const timeline = contents.get('data/timeline.jsonl')!.toString()
    expect(timeline).toContain('"enteredInError":true')
    expect(timeline).toContain('Scale read in the wrong unit')
  })
})

describe('pond archive import', () => {
  it('restores everything in another Fintrail, and a second export equals the first (ids aside)', async () => {
    const importer = await signedInUser({ name: 'New Home' })
    const client = new ApiClient(other.url)
    await client.post('/api/auth/sign-up', { name: 'New Home', email: importer.email, password: importer.password })
    const imported = await importInto(other, client, archive)
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    const ponds = (await client.get('/api/ponds')).body
    expect(ponds).toEqual([expect.objectContaining({ id: imported.body.pondId, name: 'Archive pond', role: 'owner', fishCount: 2 })])
    const fish = (await client.get(`/api/ponds/${imported.body.pondId}/fish`)).body
    const ember = fish.find((f: { name: string }) => f.name === 'Ember')
    expect(ember).toMatchObject({ microchip: source.chip, latestWeightG: 1500 })
    const page = (await client.get(`/api/fish/${ember.id}/timeline`)).body
    expect(JSON.stringify(page)).toContain('Archive Vet')
    const course = page.entries.find((e: { kind: string }) => e.kind === 'treatment')
    expect(course.derived.schedule.slots[0]).toMatchObject({ state: 'given', given: { givenAt: '2025-06-02T18:00:00.000Z', givenBy: { name: 'Archive Keeper' }, note: 'With the evening feed' } })
    expect(course.derived.schedule.slots[1].state).toBe('missed')

    for (let i = 0; i < 50; i++) {
      const photos = (await client.get(`/api/fish/${ember.id}/photos`)).body
      if (JSON.stringify(photos).includes('"ready"')) break
      await new Promise(r => setTimeout(r, 200))
    }
    const response = await fetch(`${other.url}/api/ponds/${imported.body.pondId}/export`, { headers: { cookie: client.cookieHeader() } })
    expect(response.status).toBe(200)
    const second = Buffer.from(await response.arrayBuffer())
    expect(normalise(await readZip(second))).toEqual(normalise(await readZip(archive)))
  })

  const hostile: [string, () => Promise<Buffer>, RegExp, number][] = [
    ['random bytes', async () => Buffer.from('this is not a zip file at all'.repeat(40)), /not a readable ZIP/, 400],
    ['a zip slip path', async () => {
      const contents = await readZip(archive)
      contents.set('zz/zz/evil.txt', Buffer.from('escape'))
      return renameEntry(await writeZip(contents), 'zz/zz/evil.txt', '../../evil.txt')
    }, /invalid relative path|not part of a pond archive/, 400],
    ['a zip bomb', async () => {
      const contents = await readZip(archive)
      contents.set('csv/padding.csv', Buffer.alloc(60 * 1024 * 1024, 0x20))
      return writeZip(contents)
    }, /zip bomb/, 400],
    ['an entry that claims 2 GB', async () => declareSize(archive, 'data/timeline.jsonl', 2 * 1024 ** 3), /unpacks to 2147483648 bytes/, 400],
    ['a wrong schema version', async () => {
      const contents = await readZip(archive)
      const manifest = JSON.parse(contents.get('manifest.json')!.toString())
      contents.set('manifest.json', Buffer.from(JSON.stringify({ ...manifest, schemaVersion: 99 })))
      return writeZip(contents)
    }, /schema version 1/, 400],
    ['a photo that does not match its checksum', async () => {
      const contents = await readZip(archive)
      const name = [...contents.keys()].find(n => n.startsWith('photos/'))!
      const bytes = Buffer.from(contents.get(name)!)
      bytes[bytes.length - 10] = bytes[bytes.length - 10]! ^ 0xFF
      contents.set(name, bytes)
      return writeZip(contents)
    }, /does not match its checksum/, 400],
    ['a record that fails its schema', async () => {
      const contents = await readZip(archive)
      const fishLines = contents.get('data/fish.jsonl')!.toString().replace('"species":"koi"', '"species":"shark"')
      contents.set('data/fish.jsonl', Buffer.from(fishLines))
      const manifest = JSON.parse(contents.get('manifest.json')!.toString())
      manifest.files['data/fish.jsonl'].sha256 = createHash('sha256').update(fishLines).digest('hex')
      contents.set('manifest.json', Buffer.from(JSON.stringify(manifest)))
      return writeZip(contents)
    }, /data\/fish.jsonl line \d: species/, 400],
  ]

  it.each(hostile)('refuses %s with a clear message and writes nothing', async (_label, make, message, status) => {
    const client = new ApiClient(other.url)
    const { email, password } = await signedInUser()
    await client.post('/api/auth/sign-up', { name: 'Hostile Test', email, password })
    const otherUrl = testEnv().databaseUrl.replace(/\/[^/]+$/, `/${OTHER_DB}`)
    const before = await countRows(otherUrl)
    const originalsBefore = await storedNames('photos/originals/', otherStore.storage)
    const result = await importInto(other, client, await make())
    expect(result.status, JSON.stringify(result.body)).toBe(status)
    expect(result.body.message).toMatch(message)
    expect(await countRows(otherUrl)).toEqual(before)
    expect(await storedNames('photos/originals/', otherStore.storage)).toEqual(originalsBefore)
    expect((await fetch(`${other.url}/api/health`)).status).toBe(200)
  })

  it('refuses an archive whose living fish shares a microchip with a living fish here', async () => {
    const result = await importInto({ url: MAIN_URL } as RunningServer, source.owner.client, archive)
    expect(result.status).toBe(409)
    expect(result.body.message).toMatch(/microchip/)
  })
})
