// One upload must not kill or stall the server: spreadsheets and archives are read through yauzl with the
// local entries checked against the central directory, in a worker thread with memory and size caps.
import { createHash } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_URL } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'
import { archiveWithPaddedManifest, largeCsv, largeWorkbook, smallWorkbook, withHiddenEntry, withLocalSize } from '../support/hostile-files'
import { uploadSheet } from '../support/spreadsheets'
import { declareSize, writeZip } from '../support/zip'

afterAll(closeTestDb)

const XLSX = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'
let owner: Awaited<ReturnType<typeof signedInUser>>
let pondId: string

beforeAll(async () => {
  owner = await signedInUser({ name: 'Hostile Files Owner' })
  pondId = (await createPond(owner.client)).id
  await createFish(owner.client, pondId, { name: 'Hana' })
})

const columns = (name: string, data: Buffer | string, type = XLSX) => uploadSheet(owner.client, `/api/ponds/${pondId}/measurement-imports/columns`, { name, data, type })
// A pooled connection may have been closed for idleness while the test built a file: ask once more then.
const healthy = async () => (await fetch(`${MAIN_URL}/api/health`).catch(() => fetch(`${MAIN_URL}/api/health`))).status

async function importArchive(bytes: Buffer) {
  const response = await fetch(`${MAIN_URL}/api/ponds/import`, { method: 'POST', headers: { 'content-type': 'application/zip', 'cookie': owner.client.cookieHeader() }, body: new Uint8Array(bytes) })
  return { status: response.status, body: await response.json() as { message: string, data?: { problems?: unknown[] } } }
}

describe('spreadsheet uploads', () => {
  it('reads a workbook rebuilt from verified entries', async () => {
    const response = await columns('fine.xlsx', await smallWorkbook())
    expect(response.status, JSON.stringify(response.body)).toBe(200)
    expect(response.body).toMatchObject({ format: 'xlsx', columns: ['Fish', 'Date', 'Weight'], rowCount: 1 })
  })

  it('refuses a local entry the central directory does not list, without unpacking it, and keeps serving', async () => {
    // 256 MB of zeros packed into a quarter of a megabyte, where only a header-walking reader would find it.
    const hostile = await withHiddenEntry(await smallWorkbook(), 'xl/worksheets/sheet9.xml', 256 * 1024 * 1024)
    expect(hostile.length).toBeLessThan(2 * 1024 * 1024)
    const response = await columns('hidden.xlsx', hostile)
    expect(response.status, JSON.stringify(response.body)).toBe(400)
    expect(response.body.message).toMatch(/holds data the table of contents does not list/)
    expect(response.body.data.fieldErrors.file).toHaveLength(1)
    expect(await healthy()).toBe(200)
  }, 120_000)

  it('refuses an entry whose local header declares another size than the central directory', async () => {
    const workbook = await smallWorkbook()
    const response = await columns('sizes.xlsx', withLocalSize(workbook, 'xl/workbook.xml', 4 * 1024 * 1024 * 1024 - 1))
    expect(response.status, JSON.stringify(response.body)).toBe(400)
    expect(response.body.message).toMatch(/"xl\/workbook.xml" declares different sizes inside the archive than in its table of contents/)
    expect(await healthy()).toBe(200)
  })

  it('answers /api/health while a large legal workbook is parsed in the worker', async () => {
    const workbook = await largeWorkbook(30_000)
    let answeredDuring = 0
    let done = false
    const started = performance.now()
    const upload = columns('large.xlsx', workbook).finally(() => (done = true))
    // A head start, so its body (2.5 MB over loopback) is on the server before the polling starts. It was
    // 300 ms: on a fast machine the parse had all but ended by then, and only one answer came while it ran.
    await new Promise(resolve => setTimeout(resolve, 50))
    while (!done) {
      const status = await healthy()
      if (!done && status === 200) answeredDuring++
      await new Promise(resolve => setTimeout(resolve, 20))
    }
    const response = await upload
    expect(response.status, JSON.stringify(response.body).slice(0, 500)).toBe(200)
    expect(response.body.rowCount).toBe(30_000)
    // Parsed on the event loop, every health request would wait for the parse to end.
    expect(answeredDuring, `${answeredDuring} answers in ${(performance.now() - started).toFixed(0)} ms`).toBeGreaterThanOrEqual(3)
  }, 120_000)
})

describe('a CSV over the row cap', () => {
  const mapping = { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', dateFormat: 'YYYY-MM-DD', weightColumn: 'Weight', weightUnit: 'g' }
  const imports = async () => (await testDb().query('select count(*)::int as n from measurement_imports where pond_id = $1', [pondId])).rows[0].n

  it('refuses 200,000 rows with a 413 naming the cap, writes nothing, and /api/health answers meanwhile', async () => {
    const csv = largeCsv(200_000)
    const before = await imports()
    let answeredDuring = 0
    let done = false
    const upload = uploadSheet(owner.client, `/api/ponds/${pondId}/measurement-imports`, { name: 'weigh-ins.csv', data: csv }, { mapping }).finally(() => (done = true))
    await new Promise(resolve => setTimeout(resolve, 100))
    while (!done) {
      if ((await healthy()) === 200 && !done) answeredDuring++
      await new Promise(resolve => setTimeout(resolve, 20))
    }
    const response = await upload
    expect(response.status, JSON.stringify(response.body).slice(0, 500)).toBe(413)
    expect(response.body.message).toBe('The sheet has more than 100000 rows; at most 100000 are read at once. Split it into several files.')
    expect(response.body.data.fieldErrors.file).toEqual([response.body.message])
    expect(await imports()).toBe(before)
    // A liveness check only: how fast it answers is the benchmark's business (scripts/bench/hostile-uploads.ts).
    expect(answeredDuring).toBeGreaterThanOrEqual(1)
  }, 120_000)

  it('reads a CSV of exactly 100,000 rows, and refuses one more', async () => {
    const atCap = await columns('cap.csv', largeCsv(100_000), 'text/csv')
    expect(atCap.status, JSON.stringify(atCap.body).slice(0, 500)).toBe(200)
    expect(atCap.body).toMatchObject({ format: 'csv', columns: ['Fish', 'Date', 'Weight'], rowCount: 100_000 })
    expect(atCap.body.sample).toHaveLength(8)
    const overCap = await columns('over.csv', largeCsv(100_001), 'text/csv')
    expect(overCap.status).toBe(413)
    expect(overCap.body.message).toMatch(/more than 100000 rows/)
  }, 120_000)
})

describe('pond archive uploads', () => {
  async function archiveWith(manifestBytes: Buffer, extra: [string, Buffer][] = []) {
    const contents = new Map<string, Buffer>([...extra, ['manifest.json', manifestBytes]])
    return writeZip(contents)
  }
  const manifest = (files: Record<string, { sha256: string, lines: number, bytes: number }> = {}) => ({
    format: 'fintrail-pond-archive', schemaVersion: 1, exportedAt: '2026-01-01T00:00:00.000Z',
    pond: { id: '00000000-0000-4000-8000-000000000001', name: 'Hostile', volumeLitres: null, notes: '', createdAt: '2026-01-01T00:00:00.000Z' },
    files, counts: { people: 0, fish: 0, fishEdits: 0, timeline: 0, photos: 0 },
  })

  it('refuses a manifest larger than a real pond needs (1 MB), honest or lying about its size', async () => {
    const before = (await testDb().query('select count(*)::int as n from ponds')).rows[0].n
    const honest = await archiveWithPaddedManifest(manifest(), 500 * 1024 * 1024)
    expect(honest.length).toBeLessThan(4 * 1024 * 1024)
    const refused = await importArchive(honest)
    expect(refused.status).toBe(413)
    expect(refused.body.message).toMatch(/"manifest.json" unpacks to 524288000 bytes, more than the 1048576 allowed/)
    // The same manifest declaring 1 kB: the reader stops at the declared size.
    const lying = await importArchive(declareSize(honest, 'manifest.json', 1000))
    expect(lying.status).toBe(400)
    expect(lying.body.message).toMatch(/refused/)
    expect((await testDb().query('select count(*)::int as n from ponds')).rows[0].n).toBe(before)
    expect(await healthy()).toBe(200)
  })

  it('refuses a JSON Lines record over 256 kB', async () => {
    const line = `${JSON.stringify({ ref: '00000000-0000-4000-8000-000000000002', name: 'x'.repeat(300 * 1024), email: null })}\n`
    const files = Object.fromEntries(['people', 'fish', 'fish-edits', 'timeline', 'photos'].map(f => [`data/${f}.jsonl`, { sha256: createHash('sha256').update(f === 'people' ? line : '').digest('hex'), lines: f === 'people' ? 1 : 0, bytes: 0 }]))
    const data: [string, Buffer][] = Object.keys(files).map(name => [name, Buffer.from(name === 'data/people.jsonl' ? line : '')])
    const refused = await importArchive(await archiveWith(Buffer.from(JSON.stringify(manifest(files))), data))
    expect(refused.status).toBe(413)
    expect(refused.body.message).toMatch(/data\/people.jsonl has a line longer than 262144 bytes/)
    expect(await healthy()).toBe(200)
  })

  it('refuses an archive with a hidden local entry', async () => {
    const zip = await withHiddenEntry(await archiveWith(Buffer.from(JSON.stringify(manifest()))), 'data/timeline.jsonl', 64 * 1024 * 1024)
    const refused = await importArchive(zip)
    expect(refused.status).toBe(400)
    expect(refused.body.message).toMatch(/holds data the table of contents does not list/)
  })
})
