import ExcelJS from 'exceljs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { createFish, pondWithRoles, testMicrochip } from '../support/factories'
import { handMadeZip, uploadSheet } from '../support/spreadsheets'

afterAll(closeTestDb)

type Roles = Awaited<ReturnType<typeof pondWithRoles>>
let world: Roles
let hana: { id: string }, kumo: { id: string }
const hanaChip = testMicrochip()
const kumoChip = testMicrochip()

beforeAll(async () => {
  world = await pondWithRoles()
  hana = await createFish(world.owner.client, world.pond.id, { name: 'Hana', microchip: hanaChip })
  kumo = await createFish(world.owner.client, world.pond.id, { name: 'Kumo', microchip: kumoChip })
  for (let i = 0; i < 2; i++) await createFish(world.owner.client, world.pond.id, { name: 'Sora' })
})

const path = (what = '') => `/api/ponds/${world.pond.id}/measurement-imports${what}`

// Row numbers as the spreadsheet shows them: the header is row 1.
const MIXED_CSV = [
  'Fish,Date,Weight,Unit,Length',
  'Hana,2024-03-01,1250,g,41', // 2 good
  'Hana,2024-04-01,1.3,kg,41.5', // 3 good, kg
  'kumo ,2024-03-01,2 lb 12 oz,,38', // 4 good, pounds and ounces in the cell, name in other case and spacing
  'Kumo,2024-04-01,2.9,lb,38.5', // 5 good, lb from the unit column
  'Hana,2024-13-01,1300,g,42', // 6 no 13th month
  'Nobody,2024-03-01,900,g,35', // 7 no such fish
  'Sora,2024-03-01,800,g,33', // 8 two fish named Sora
  'Kumo,2024-05-01,heavy,g,39', // 9 not a number
  'Kumo,2024-06-01,13,stone,39', // 10 not a weight unit we read
  'Hana,2024-07-01,90000,g,44', // 11 90 kg: out of range
  'Hana,2024-03-01,1250,g,41', // 12 the same as row 2
  'Kumo,2024-07-01,,,', // 13 nothing measured
  '', // 14 blank
  'Hana,2099-01-01,1400,g,45', // 15 in the future
  'Kumo,2024-08-01,1350,,40', // 16 no unit anywhere
].join('\n') + '\n'

const MIXED_MAPPING = { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', dateFormat: 'YYYY-MM-DD', weightColumn: 'Weight', weightUnitColumn: 'Unit', lengthColumn: 'Length', lengthUnit: 'cm' }

async function measurementsOf(fishId: string) {
  const { rows } = await testDb().query(
    `select e.data, e.occurred_at, e.author_id, (select count(*)::int from timeline_revisions r where r.entry_id = e.id) as revisions
     from timeline_entries e where e.fish_id = $1 and e.kind = 'measurement' order by e.occurred_at, e.created_at`, [fishId])
  return rows as { data: Record<string, unknown>, occurred_at: Date, author_id: string, revisions: number }[]
}

describe('importing measurements from a spreadsheet', () => {
  it('offers the columns, a first mapping and the first rows before anything else', async () => {
    const response = await uploadSheet(world.keeper.client, path('/columns'), { name: 'weights.csv', data: MIXED_CSV })
    expect(response.status, JSON.stringify(response.body)).toBe(200)
    expect(response.body).toMatchObject({
      format: 'csv', columns: ['Fish', 'Date', 'Weight', 'Unit', 'Length'], rowCount: 14, blankLines: 1,
      suggested: { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', weightColumn: 'Weight', lengthColumn: 'Length' },
    })
    // 2024-13-01 fits no format, so none is suggested: the person chooses.
    expect(response.body.suggested.dateFormat).toBeUndefined()
    expect(response.body.sample[0]).toEqual({ row: 2, cells: { Fish: 'Hana', Date: '2024-03-01', Weight: '1250', Unit: 'g', Length: '41' } })
  })

  it('previews, then imports the good rows once, listing every other row with its reason', async () => {
    const preview = await uploadSheet(world.keeper.client, path('/preview'), { name: 'weights.csv', data: MIXED_CSV }, { mapping: MIXED_MAPPING })
    expect(preview.status, JSON.stringify(preview.body)).toBe(200)
    expect(preview.body).toMatchObject({ dryRun: true, importId: null, rowCount: 14, blankLines: 1, readyCount: 4, importedCount: 0 })
    expect(await measurementsOf(hana.id)).toEqual([])

    const expectedProblems = [
      [6, 'bad_date'], [7, 'unknown_fish'], [8, 'ambiguous_fish'], [9, 'not_a_number'], [10, 'unknown_unit'],
      [11, 'out_of_range'], [13, 'no_measurement'], [15, 'bad_date'], [16, 'missing_unit'],
    ]
    expect(preview.body.problems.map((p: { row: number, reason: string }) => [p.row, p.reason])).toEqual(expectedProblems)
    expect(preview.body.problems[0]).toMatchObject({ message: '"2024-13-01" is not a real day (read as YYYY-MM-DD)', cells: { Fish: 'Hana', Date: '2024-13-01', Weight: '1300', Unit: 'g', Length: '42' } })
    expect(preview.body.problems[2].message).toMatch(/2 fish in this pond are named "Sora"/)
    expect(preview.body.problems[7].message).toBe('2099-01-01 is in the future')
    expect(preview.body.skipped).toEqual([{ row: 12, reason: 'duplicate_in_file', message: 'The same measurement as row 2' }])
    // Every one of the 14 rows is accounted for: ready, refused or skipped.
    expect(preview.body.readyCount + preview.body.problems.length + preview.body.skipped.length).toBe(preview.body.rowCount)

    const imported = await uploadSheet(world.keeper.client, path(), { name: 'weights.csv', data: MIXED_CSV }, { mapping: MIXED_MAPPING })
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    expect(imported.body).toMatchObject({ dryRun: false, importedCount: 4, readyCount: 4 })
    expect(imported.body.byFish).toEqual([{ fishId: hana.id, fishName: 'Hana', count: 2 }, { fishId: kumo.id, fishName: 'Kumo', count: 2 }])

    // Conversions use the exact factors of NIST SP 811 / Handbook 44: 1 lb = 453.59237 g, 1 oz = 28.349523125 g, 1 kg = 1000 g.
    // 2 lb 12 oz = 907.18474 + 340.1942775 = 1247.3790175 g → 1247.4; 2.9 lb = 1315.417873 g → 1315.4.
    const hanaRows = await measurementsOf(hana.id)
    expect(hanaRows.map(r => r.data)).toEqual([
      { weightG: 1250, lengthCm: 41, lengthType: 'total' },
      { weightG: 1300, lengthCm: 41.5, lengthType: 'total', entered: { weight: '1.3 kg' } },
    ])
    expect(hanaRows.map(r => r.occurred_at.toISOString())).toEqual(['2024-03-01T12:00:00.000Z', '2024-04-01T12:00:00.000Z'])
    expect(hanaRows.every(r => r.author_id === world.keeper.user.id && r.revisions === 1)).toBe(true)
    expect((await measurementsOf(kumo.id)).map(r => r.data)).toEqual([
      { weightG: 1247.4, lengthCm: 38, lengthType: 'total', entered: { weight: '2 lb 12 oz' } },
      { weightG: 1315.4, lengthCm: 38.5, lengthType: 'total', entered: { weight: '2.9 lb' } },
    ])
    // They are ordinary timeline entries: the profile's latest weight comes from them.
    const timeline = (await world.owner.client.get(`/api/fish/${kumo.id}/timeline?kind=measurement`)).body.entries
    expect(timeline[0]).toMatchObject({ author: { name: 'Keeper' }, data: { weightG: 1315.4 } })

    const audit = (await world.owner.client.get(`/api/ponds/${world.pond.id}/audit`)).body.events[0]
    expect(audit).toMatchObject({ action: 'measurements.imported', details: { fileName: 'weights.csv', rows: 14, imported: 4, problems: 9, skipped: 1 } })
    expect((await uploadSheet(world.owner.client, path(), { name: 'empty.csv', data: '' }, { mapping: MIXED_MAPPING })).status).toBe(400)
    const list = await world.keeper.client.get(path())
    expect(list.body[0]).toMatchObject({ fileName: 'weights.csv', importedBy: 'Keeper', rowCount: 14, importedCount: 4, problemCount: 9, skippedCount: 1 })
  })

  it('adds nothing the second time, even after an imported entry was amended', async () => {
    const [first] = (await world.owner.client.get(`/api/fish/${hana.id}/timeline?kind=measurement`)).body.entries.slice(-1)
    const amend = await world.keeper.client.post(`/api/timeline/${first.id}/amend`, { revision: 1, data: { weightG: 1255, lengthCm: 41, lengthType: 'total' }, reason: 'Scale read 5 g low' })
    expect(amend.status, JSON.stringify(amend.body)).toBe(200)
    const again = await uploadSheet(world.owner.client, path(), { name: 'weights-copy.csv', data: MIXED_CSV }, { mapping: MIXED_MAPPING })
    expect(again.status).toBe(201)
    expect(again.body.importedCount).toBe(0)
    expect(again.body.skipped.map((s: { row: number, reason: string }) => [s.row, s.reason])).toEqual([
      [2, 'already_imported'], [3, 'already_imported'], [4, 'already_imported'], [5, 'already_imported'], [12, 'duplicate_in_file'],
    ])
    expect(again.body.skipped[0].message).toMatch(/^Imported before, on \d{4}-\d{2}-\d{2} from weights\.csv$/)
    expect(await measurementsOf(hana.id)).toHaveLength(2)
    expect(await measurementsOf(kumo.id)).toHaveLength(2)
  })

  it('lands a file sent twice at the same moment once', async () => {
    const csv = 'Fish,Date,Weight\nHana,2023-01-01,1100\nKumo,2023-01-01,1000\nHana,2023-02-01,1110\n'
    const mapping = { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', dateFormat: 'YYYY-MM-DD', weightColumn: 'Weight', weightUnit: 'g' }
    const both = await Promise.all([1, 2].map(() => uploadSheet(world.keeper.client, path(), { name: 'twice.csv', data: csv }, { mapping })))
    expect(both.map(r => r.status)).toEqual([201, 201])
    expect(both.map(r => r.body.importedCount).sort()).toEqual([0, 3])
    const { rows } = await testDb().query(`select count(*)::int as n from timeline_entries where fish_id = any($1) and kind = 'measurement' and occurred_at < '2023-12-31'`, [[hana.id, kumo.id]])
    expect(rows[0].n).toBe(3)
  })

  it('reads an .xlsx workbook: date cells, numbers, microchips and a fixed length unit', async () => {
    const workbook = new ExcelJS.Workbook()
    const sheet = workbook.addWorksheet('Weigh-ins')
    workbook.addWorksheet('Notes').addRow(['nothing here'])
    sheet.addRow(['Microchip', 'Measured on', 'Weight (g)', 'TL (mm)'])
    sheet.addRow([hanaChip, new Date(Date.UTC(2022, 5, 15)), 980, 392])
    sheet.addRow([`${kumoChip.slice(0, 3)} ${kumoChip.slice(3)}`, new Date(Date.UTC(2022, 5, 15)), 1020.5, 401])
    sheet.addRow(['999000000000001', new Date(Date.UTC(2022, 5, 15)), 900, 380])
    const data = Buffer.from(await workbook.xlsx.writeBuffer())
    const columns = await uploadSheet(world.keeper.client, path('/columns'), { name: 'weigh-ins.xlsx', data, type: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' })
    expect(columns.body).toMatchObject({ format: 'xlsx', sheets: ['Weigh-ins', 'Notes'], sheet: 'Weigh-ins', columns: ['Microchip', 'Measured on', 'Weight (g)', 'TL (mm)'], suggested: { fishColumn: 'Microchip', fishMatch: 'microchip', dateColumn: 'Measured on' } })
    const mapping = { fishColumn: 'Microchip', fishMatch: 'microchip', dateColumn: 'Measured on', dateFormat: 'DD/MM/YYYY', weightColumn: 'Weight (g)', weightUnit: 'g', lengthColumn: 'TL (mm)', lengthUnit: 'mm', sheet: 'Weigh-ins' }
    const imported = await uploadSheet(world.keeper.client, path(), { name: 'weigh-ins.xlsx', data }, { mapping })
    expect(imported.status, JSON.stringify(imported.body)).toBe(201)
    expect(imported.body.importedCount).toBe(2)
    expect(imported.body.problems).toEqual([{ row: 4, reason: 'unknown_fish', message: 'No fish in this pond has the microchip 999000000000001', cells: expect.any(Object) }])
    const hanaRows = await measurementsOf(hana.id)
    expect(hanaRows[0]).toMatchObject({ data: { weightG: 980, lengthCm: 39.2, lengthType: 'total', entered: { length: '392 mm' } } })
    expect(hanaRows[0]!.occurred_at.toISOString()).toBe('2022-06-15T12:00:00.000Z')
  })

  it('refuses hostile or unreadable files with a clear message and writes nothing', async () => {
    const count = async () => (await testDb().query('select count(*)::int as n from measurement_imports where pond_id = $1', [world.pond.id])).rows[0].n
    const before = await count()
    const mapping = MIXED_MAPPING
    const xlsx = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'
    // A zip bomb: 50 MB of zeros that declares 1 kB.
    const liar = handMadeZip([{ name: 'xl/worksheets/sheet1.xml', data: Buffer.alloc(50 * 1024 * 1024), declaredSize: 1024 }])
    const bomb = await uploadSheet(world.keeper.client, path(), { name: 'bomb.xlsx', data: liar, type: xlsx }, { mapping })
    expect(bomb.status).toBe(400)
    expect(bomb.body.message).toMatch(/unpacks to more than it declares/)
    // An honest but oversized entry: 150 MB declared and true, about 150 kB packed.
    const huge = await uploadSheet(world.keeper.client, path(), { name: 'huge.xlsx', data: handMadeZip([{ name: 'xl/sharedStrings.xml', data: Buffer.alloc(150 * 1024 * 1024) }]), type: xlsx }, { mapping })
    expect(huge.status).toBe(400)
    expect(huge.body.message).toMatch(/unpacks to 157286400 bytes; at most 104857600/)
    const slip = await uploadSheet(world.keeper.client, path(), { name: 'slip.xlsx', data: handMadeZip([{ name: '../../etc/cron.d/x', data: Buffer.from('x') }]), type: xlsx }, { mapping })
    expect(slip.body.message).toMatch(/points outside the archive/)
    const tooBig = await uploadSheet(world.keeper.client, path(), { name: 'big.csv', data: Buffer.alloc(11 * 1024 * 1024, 'a') }, { mapping })
    expect(tooBig.status).toBe(413)
    expect((await uploadSheet(world.keeper.client, path(), { name: 'old.xls', data: 'not really' }, { mapping })).status).toBe(415)
    expect((await uploadSheet(world.keeper.client, path(), { name: 'fake.xlsx', data: 'Fish,Date\n' }, { mapping })).status).toBe(400)
    expect((await uploadSheet(world.keeper.client, path(), { name: 'latin1.csv', data: Buffer.from([0x46, 0x69, 0x73, 0x68, 0x0A, 0xE9, 0x0A]) }, { mapping })).body.message).toMatch(/not UTF-8/)
    const noColumn = await uploadSheet(world.keeper.client, path(), { name: 'w.csv', data: MIXED_CSV }, { mapping: { ...mapping, fishColumn: 'Koi' } })
    expect(noColumn.status).toBe(400)
    expect(noColumn.body.data.fieldErrors.fishColumn).toEqual(['The sheet has no column "Koi"'])
    const badMapping = await uploadSheet(world.keeper.client, path(), { name: 'w.csv', data: MIXED_CSV }, { mapping: { fishColumn: 'Fish', dateColumn: 'Date' } })
    expect(Object.keys(badMapping.body.data.fieldErrors).sort()).toEqual(['dateFormat', 'fishMatch'])
    expect((await uploadSheet(world.keeper.client, path(), { name: 'w.csv', data: MIXED_CSV }, { mapping: 'not json' })).status).toBe(400)
    expect(await count()).toBe(before)
  }, 120_000)

  it('is for owners and keepers: vet 403, outsider 404, signed out 401, a read-only keeper 403', async () => {
    const { owner, keeper, vet, outsider, anonymous, pond } = await pondWithRoles()
    await createFish(owner.client, pond.id, { name: 'Hana' })
    const url = (what = '') => `/api/ponds/${pond.id}/measurement-imports${what}`
    const file = { name: 'w.csv', data: 'Fish,Date,Weight\nHana,2024-01-01,1000\n' }
    const mapping = { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', dateFormat: 'YYYY-MM-DD', weightColumn: 'Weight', weightUnit: 'g' }
    for (const [client, status] of [[vet.client, 403], [outsider.client, 404], [anonymous.client, 401]] as const) {
      expect((await uploadSheet(client, url('/columns'), file)).status).toBe(status)
      expect((await uploadSheet(client, url('/preview'), file, { mapping })).status).toBe(status)
      expect((await uploadSheet(client, url(), file, { mapping })).status).toBe(status)
      expect((await client.get(url())).status).toBe(status)
    }
    expect((await uploadSheet(owner.client, url('/preview'), file, { mapping })).status).toBe(200)
    await testDb().query('update memberships set read_only = true where pond_id = $1 and user_id = $2', [pond.id, keeper.user.id])
    expect((await uploadSheet(keeper.client, url(), file, { mapping })).status).toBe(403)
    expect((await keeper.client.get(url())).status).toBe(200)
    await testDb().query('update memberships set read_only = false where pond_id = $1 and user_id = $2', [pond.id, keeper.user.id])
    expect((await uploadSheet(keeper.client, url(), file, { mapping })).status).toBe(201)
  })
})
