import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { createFish, createPond, pondWithRoles } from '../support/factories'
import type { ApiClient } from '../support/client'
import { addEntry, countEntries, daysAgo, sampleEntries } from '../support/timeline'

afterAll(closeTestDb)

type World = Awaited<ReturnType<typeof pondWithRoles>>
type Who = 'owner' | 'keeper' | 'vet' | 'outsider' | 'anonymous'
let world: World
let companionId: string

beforeAll(async () => {
  world = await pondWithRoles()
  companionId = (await createFish(world.owner.client, world.pond.id, { name: 'Companion' })).id
})

const client = (who: Who): ApiClient => world[who].client

// Every kind written by every role, with the exact status. Clinical kinds are the vet's;
// keepers and owners may note a suspected problem; a keeper may record a treatment given on instruction.
const matrix: { entry: keyof ReturnType<typeof sampleEntries>, expected: Record<Who, number> }[] = [
  { entry: 'measurement', expected: { owner: 201, keeper: 201, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'observation', expected: { owner: 201, keeper: 201, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'exam', expected: { owner: 403, keeper: 403, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'problemActive', expected: { owner: 403, keeper: 403, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'problemSuspected', expected: { owner: 201, keeper: 201, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'procedure', expected: { owner: 403, keeper: 403, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'anaesthesia', expected: { owner: 403, keeper: 403, vet: 201, outsider: 404, anonymous: 401 } },
  // Without an instructing vet, an owner's or keeper's treatment lacks a field their form asks for: 400.
  { entry: 'treatmentPrescribed', expected: { owner: 400, keeper: 400, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'treatmentGiven', expected: { owner: 201, keeper: 201, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'labResult', expected: { owner: 403, keeper: 403, vet: 201, outsider: 404, anonymous: 401 } },
  { entry: 'companion', expected: { owner: 201, keeper: 201, vet: 201, outsider: 404, anonymous: 401 } },
]

describe('who may write each kind', () => {
  const cases = matrix.flatMap(row => (Object.keys(row.expected) as Who[]).map(who => ({ ...row, who, status: row.expected[who] })))
  it.each(cases)('$entry as $who answers $status and writes only when allowed', async ({ entry, who, status }) => {
    const before = await countEntries(world.fish.id)
    const response = await client(who).post(`/api/fish/${world.fish.id}/timeline`, sampleEntries(companionId, world.vet.user.id)[entry])
    expect(response.status, JSON.stringify(response.body)).toBe(status)
    expect(await countEntries(world.fish.id)).toBe(before + (status === 201 ? 1 : 0))
    if (status === 201) expect(response.body.entry.author.name).toBe(world[who as 'owner'].user.name)
    if (status === 403) expect(response.body.message).toMatch(/vet|keeper|owner/)
  })

  // A fish dies once, so each role gets a fish of its own.
  it.each([['owner', 201], ['keeper', 403], ['vet', 201], ['outsider', 404], ['anonymous', 401]] as const)('death as %s answers %i', async (who, status) => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: `Old ${who}` })
    const response = await client(who).post(`/api/fish/${fish.id}/timeline`, sampleEntries(companionId).death)
    expect(response.status, JSON.stringify(response.body)).toBe(status)
    const { rows } = await testDb().query('select status from fish where id = $1', [fish.id])
    expect(rows[0].status).toBe(status === 201 ? 'deceased' : 'alive')
    expect(await countEntries(fish.id)).toBe(status === 201 ? 1 : 0)
  })

  it('refuses a keeper a confirmed problem with the field to change, and a treatment without the instructing vet', async () => {
    const problem = await client('keeper').post(`/api/fish/${world.fish.id}/timeline`, sampleEntries(companionId).problemActive)
    expect(problem.status).toBe(403)
    expect(problem.body.data.fieldErrors['data.status'][0]).toMatch(/suspected/)
    const treatment = await client('keeper').post(`/api/fish/${world.fish.id}/timeline`, sampleEntries(companionId).treatmentPrescribed)
    expect(treatment.status).toBe(400)
    expect(treatment.body.data.fieldErrors['data.instructedById'][0]).toMatch(/choose one of the pond’s vets/)
  })

  it('refuses a keeper a procedure before looking at its fields', async () => {
    const response = await client('keeper').post(`/api/fish/${world.fish.id}/timeline`, { kind: 'procedure', occurredAt: daysAgo(1), data: {} })
    expect(response.status).toBe(403)
    expect(response.body.message).toBe('Procedure entries are written by a vet of the pond')
  })

  it('refuses a procedure whose anaesthesia record a keeper brings along', async () => {
    const before = await countEntries(world.fish.id)
    const { procedure, anaesthesia } = sampleEntries(companionId)
    const response = await client('owner').post(`/api/fish/${world.fish.id}/timeline`, { ...procedure, anaesthesia: anaesthesia.data })
    expect(response.status).toBe(403)
    expect(await countEntries(world.fish.id)).toBe(before)
  })
})

describe('fields checked per kind', () => {
  const bad: { kind: string, data: Record<string, unknown>, field: string, message: RegExp }[] = [
    { kind: 'measurement', data: { lengthType: 'total' }, field: 'data.weightG', message: /weight, a length or both/ },
    { kind: 'measurement', data: { weightG: -5 }, field: 'data.weightG', message: /more than 0/ },
    { kind: 'measurement', data: { lengthCm: 40, lengthType: 'diagonal' }, field: 'data.lengthType', message: /total, fork or standard/ },
    { kind: 'measurement', data: { weightG: 100, colour: 'red' }, field: 'data', message: /colour/ },
    { kind: 'observation', data: { signs: ['sneezing'] }, field: 'data.signs.0', message: /listed signs/ },
    { kind: 'observation', data: {}, field: 'data.text', message: /Tick what you saw/ },
    { kind: 'exam', data: { findings: [{ system: 'gills', state: 'abnormal' }] }, field: 'data.findings.0.note', message: /abnormal/ },
    { kind: 'exam', data: { findings: [{ system: 'spleen', state: 'normal' }] }, field: 'data.findings.0.system', message: /body system/ },
    { kind: 'problem', data: { name: 'Ulcer', onset: daysAgo(3), status: 'resolved' }, field: 'data.resolvedOn', message: /date it resolved/ },
    { kind: 'problem', data: { name: 'Ulcer', onset: daysAgo(3), status: 'active', resolvedOn: daysAgo(1) }, field: 'data.resolvedOn', message: /Only a resolved/ },
    { kind: 'procedure', data: { code: 'enucleation', side: 'not_applicable', performedBy: 'Dr Vet' }, field: 'data.side', message: /which eye/ },
    { kind: 'procedure', data: { code: 'biopsy', side: 'left' }, field: 'data.performedBy', message: /Who performed/ },
    { kind: 'procedure', data: { name: 'Enucleation', side: 'left', performedBy: 'Dr Vet' }, field: 'data.code', message: /Choose the procedure/ },
    { kind: 'procedure', data: { code: 'other', side: 'left', performedBy: 'Dr Vet' }, field: 'data.name', message: /Describe the procedure/ },
    { kind: 'anaesthesia', data: { agent: 'Eugenol (clove oil)', concentrationMgL: 40, buffer: 'Sodium bicarbonate' }, field: 'data.buffer', message: /only for MS-222/ },
    { kind: 'treatment', data: { drug: 'Potassium permanganate', route: 'dip', dose: 10, doseUnit: 'mg/L', startOn: daysAgo(1) }, field: 'data.exposureMinutes', message: /minutes/ },
    { kind: 'treatment', data: { drug: 'Salt', route: 'bath', dose: 3, doseUnit: 'g/L', startOn: daysAgo(1) }, field: 'data.route', message: /hospital-tank bath, whole pond/ },
    { kind: 'treatment', data: { drug: 'Salt', route: 'pond_immersion', dose: 3, doseUnit: 'dose', startOn: daysAgo(1) }, field: 'data.doseUnit', message: /dose unit/ },
    { kind: 'anaesthesia', data: { agent: 'MS-222', concentrationMgL: 0 }, field: 'data.concentrationMgL', message: /more than 0/ },
    { kind: 'anaesthesia', data: { agent: 'MS-222', concentrationMgL: 100, recoveryMinutes: -1 }, field: 'data.recoveryMinutes', message: /negative/ },
    { kind: 'treatment', data: { drug: 'Antibiotic', route: 'injection', dose: 10, doseUnit: 'mg/kg', startOn: daysAgo(1) }, field: 'data.injectionSite', message: /injection site/ },
    { kind: 'treatment', data: { drug: 'Salt', route: 'pond_immersion', dose: 3, doseUnit: 'g/L', startOn: daysAgo(1), endOn: daysAgo(3) }, field: 'data.endOn', message: /before it starts/ },
    { kind: 'lab_result', data: { panel: 'haematology' }, field: 'data.findings', message: /values, organisms/ },
    { kind: 'lab_result', data: { panel: 'biochemistry', analytes: [{ name: 'Glucose', value: 3, low: 5, high: 2 }] }, field: 'data.analytes.0.high', message: /lower limit/ },
    { kind: 'companion', data: { relatedFishId: 'not-a-fish', relation: 'guides' }, field: 'data.relatedFishId', message: /other fish/ },
    { kind: 'companion', data: { relatedFishId: '00000000-0000-4000-8000-000000000000', relation: 'sings to' }, field: 'data.relation', message: /how they relate/ },
    { kind: 'death', data: { euthanased: 'perhaps' }, field: 'data.euthanased', message: /Yes or no/ },
  ]
  it.each(bad)('$kind: $field', async ({ kind, data, field, message }) => {
    const before = await countEntries(world.fish.id)
    const response = await client('vet').post(`/api/fish/${world.fish.id}/timeline`, { kind, occurredAt: daysAgo(1), data })
    expect(response.status, JSON.stringify(response.body)).toBe(400)
    expect(response.body.data.fieldErrors[field]?.join(' '), JSON.stringify(response.body.data.fieldErrors)).toMatch(message)
    expect(await countEntries(world.fish.id)).toBe(before)
  })

  it('checks the envelope: kind, date, unknown fields, broken JSON', async () => {
    const post = (body: unknown) => client('vet').post(`/api/fish/${world.fish.id}/timeline`, body)
    expect((await post({ kind: 'weather', occurredAt: daysAgo(1), data: {} })).body.data.fieldErrors.kind).toEqual(['Choose what kind of entry this is'])
    const tomorrow = new Date(Date.now() + 2 * 86_400_000).toISOString()
    expect((await post({ ...sampleEntries(companionId).measurement, occurredAt: tomorrow })).body.data.fieldErrors.occurredAt).toEqual(['Cannot be in the future'])
    expect((await post({ ...sampleEntries(companionId).measurement, occurredAt: 'last Tuesday' })).body.data.fieldErrors.occurredAt[0]).toMatch(/YYYY-MM-DD/)
    expect((await post({ ...sampleEntries(companionId).measurement, mood: 'calm' })).status).toBe(400)
    const raw = await client('vet').request('POST', `/api/fish/${world.fish.id}/timeline`, { raw: '{"kind":', headers: { 'content-type': 'application/json' } })
    expect(raw.status).toBe(400)
  })

  it('refuses a companion from another pond with a field message', async () => {
    const elsewhere = await createPond(world.owner.client)
    const stranger = await createFish(world.owner.client, elsewhere.id, { name: 'Stranger' })
    const response = await client('keeper').post(`/api/fish/${world.fish.id}/timeline`, { kind: 'companion', occurredAt: daysAgo(1), data: { relatedFishId: stranger.id, relation: 'stays_close' } })
    expect(response.status).toBe(400)
    expect(response.body.data.fieldErrors['data.relatedFishId']).toEqual(['Choose a fish of the same pond'])
    const itself = await client('keeper').post(`/api/fish/${world.fish.id}/timeline`, { kind: 'companion', occurredAt: daysAgo(1), data: { relatedFishId: world.fish.id, relation: 'avoids' } })
    expect(itself.body.data.fieldErrors['data.relatedFishId']).toEqual(['Choose another fish, not this one'])
  })

  it('stores a measurement in metric with the typed text beside it, and answers with K and Wr', async () => {
    // 2 lb 12 oz = 2 × 453.59237 + 12 × 28.349523125 = 1247.379 g; 16.5 in = 41.91 cm (NIST SP 811 factors).
    const { entry } = await addEntry(client('keeper'), world.fish.id, {
      kind: 'measurement', occurredAt: daysAgo(2),
      data: { weightG: 1247.379, lengthCm: 41.91, lengthType: 'total', entered: { weight: '2 lb 12 oz', length: '16.5 in' } },
    })
    expect(entry.data).toMatchObject({ weightG: 1247.379, lengthCm: 41.91, lengthType: 'total', entered: { weight: '2 lb 12 oz' } })
    const derived = entry.derived as { conditionK: number, relativeWeight: number }
    // K = 100 · 1247.379 / 41.91³ = 124737.9 / 73612.8 = 1.6945 (Fulton; Nash et al. 2006).
    expect(derived.conditionK).toBeCloseTo(1.6945, 3)
    // Ws = 10^(−4.639 + 2.920 · log10 419.1 mm) = 10^3.01817 = 1042.7 g (Bister et al. 2000); Wr = 100 · 1247.379 / 1042.7 = 119.6.
    expect(derived.relativeWeight).toBeCloseTo(119.6, 1)
  })

  it('answers a retried send with the entry it already wrote', async () => {
    const id = crypto.randomUUID()
    const entry = { ...sampleEntries(companionId).observation, id }
    const first = await client('keeper').post(`/api/fish/${world.fish.id}/timeline`, entry)
    expect(first.status).toBe(201)
    const before = await countEntries(world.fish.id)
    const again = await client('keeper').post(`/api/fish/${world.fish.id}/timeline`, entry)
    expect(again.status).toBe(200)
    expect(again.body.entry.id).toBe(id)
    expect(await countEntries(world.fish.id)).toBe(before)
    const someoneElse = await client('owner').post(`/api/fish/${world.fish.id}/timeline`, entry)
    expect(someoneElse.status).toBe(409)
  })

  it('writes a procedure and its anaesthesia record together, flags a long recovery, and links them', async () => {
    const { procedure, anaesthesia } = sampleEntries(companionId)
    const body = await addEntry(client('vet'), world.fish.id, { ...procedure, anaesthesia: { ...anaesthesia.data, recoveryMinutes: 41 } })
    expect(body.anaesthesia).not.toBeNull()
    expect(body.entry.linkedEntryId).toBe(body.anaesthesia!.id)
    expect((body.entry.data as { anaesthesiaEntryId: string }).anaesthesiaEntryId).toBe(body.anaesthesia!.id)
    // Common practice: a recovery longer than 30 minutes is flagged.
    expect((body.anaesthesia as unknown as { derived: { prolongedRecovery: boolean } }).derived.prolongedRecovery).toBe(true)
    const short = await addEntry(client('vet'), world.fish.id, anaesthesia)
    expect((short.entry.derived as { prolongedRecovery: boolean }).prolongedRecovery).toBe(false)
    const wrongLink = await client('vet').post(`/api/fish/${world.fish.id}/timeline`, { ...procedure, data: { ...procedure.data, anaesthesiaEntryId: body.entry.id } })
    expect(wrongLink.body.data.fieldErrors['data.anaesthesiaEntryId']).toEqual(['Not an anaesthesia record of this fish'])
  })

  it('flags lab values outside their reference interval', async () => {
    const { entry } = await addEntry(client('vet'), world.fish.id, {
      kind: 'lab_result', occurredAt: daysAgo(1),
      data: { panel: 'biochemistry', analytes: [
        { name: 'Glucose', value: 2.1, unit: 'mmol/L', low: 2.5, high: 6 },
        { name: 'Total protein', value: 35, unit: 'g/L', low: 25, high: 45 },
        { name: 'Ammonia', value: 900, unit: 'µmol/L', high: 600 },
      ] },
    })
    expect((entry.derived as { analyteFlags: unknown[] }).analyteFlags).toEqual(['low', null, 'high'])
  })
})
