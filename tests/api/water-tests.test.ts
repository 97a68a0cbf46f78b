import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { pondWithRoles, signedInUser } from '../support/factories'
import type { ApiClient } from '../support/client'

afterAll(closeTestDb)

type World = Awaited<ReturnType<typeof pondWithRoles>>
let world: World
let readOnly: Awaited<ReturnType<typeof signedInUser>>

beforeAll(async () => {
  world = await pondWithRoles()
  readOnly = await signedInUser({ name: 'Former keeper' })
  await testDb().query('insert into memberships (pond_id, user_id, role, read_only) values ($1, $2, $3, true)', [world.pond.id, readOnly.user.id, 'keeper'])
})

const path = () => `/api/ponds/${world.pond.id}/water-tests`
const countTests = async () => Number((await testDb().query('select count(*) from water_tests where pond_id = $1', [world.pond.id])).rows[0].count)
const hoursAgo = (h: number) => new Date(Date.now() - h * 3_600_000).toISOString()

describe('recording a water test', () => {
  it('answers 201 with the values, the computed un-ionized ammonia and a flag per value', async () => {
    // IFAS FA16 worked example: TAN 1.0 mg/L at 24 °C and pH 8.0 → 0.0502 mg/L un-ionized (fraction 0.0502).
    const response = await world.keeper.client.post(path(), {
      testedAt: hoursAgo(1), temperatureC: 24, pH: 8.0, tanMgL: 1.0, nitriteNMgL: 0.05, nitrateNMgL: 12,
      khDKH: 3, ghDGH: 8, dissolvedOxygenMgL: 7.5, salinityPpt: 0.5, notes: 'After rain',
    })
    expect(response.status, JSON.stringify(response.body)).toBe(201)
    const test = response.body.waterTest
    expect(test).toMatchObject({ temperatureC: 24, pH: 8, tanMgL: 1, nitriteNMgL: 0.05, nitrateNMgL: 12, khDKH: 3, ghDGH: 8, dissolvedOxygenMgL: 7.5, salinityPpt: 0.5, notes: 'After rain' })
    expect(test.testedBy.name).toBe('Keeper')
    expect(test.unionizedAmmoniaNMgL).toBeCloseTo(0.0502, 4)
    // EPA 2013 chronic criterion at pH 8.0 and 24 °C is about 0.60 mg TAN/L (formula of EPA-822-R-13-001), so TAN 1.0 is high;
    // NH3-N 0.0502 is above the common-practice 0.02; nitrate 12 mg/L N above 10; KH 3 dKH below 4.2 (SRAC 464: 75 mg/L as CaCO3).
    expect(test.flags).toEqual({
      temperatureC: 'ok', pH: 'ok', tanMgL: 'high', unionizedAmmoniaNMgL: 'high', nitriteNMgL: 'ok', nitrateNMgL: 'high',
      khDKH: 'low', ghDGH: 'ok', dissolvedOxygenMgL: 'ok', salinityPpt: 'ok',
    })
  })

  it('flags only what was measured; un-ionized ammonia needs TAN, pH and temperature', async () => {
    const response = await world.owner.client.post(path(), { testedAt: hoursAgo(2), tanMgL: 0.25, dissolvedOxygenMgL: 4 })
    expect(response.status, JSON.stringify(response.body)).toBe(201)
    expect(response.body.waterTest.unionizedAmmoniaNMgL).toBeNull()
    expect(response.body.waterTest.pH).toBeNull()
    // No pH or temperature: the EPA criterion for TAN cannot be worked out, so TAN gets no flag.
    expect(response.body.waterTest.flags).toEqual({ dissolvedOxygenMgL: 'low' })
  })

  it('lists the pond’s tests newest first', async () => {
    const older = await world.vet.client.post(path(), { testedAt: hoursAgo(48), pH: 7.2 })
    expect(older.status).toBe(201)
    const response = await world.keeper.client.get(path())
    expect(response.status).toBe(200)
    const times = (response.body.waterTests as { testedAt: string }[]).map(t => t.testedAt)
    expect(times.length).toBeGreaterThanOrEqual(3)
    expect([...times].sort().reverse()).toEqual(times)
    expect(response.body.waterTests.at(-1).id).toBe(older.body.waterTest.id)
  })

  it('a retried send with the same client id writes once', async () => {
    const id = randomUUID()
    const body = { id, testedAt: hoursAgo(3), pH: 7.6 }
    const before = await countTests()
    const first = await world.keeper.client.post(path(), body)
    const again = await world.keeper.client.post(path(), body)
    expect([first.status, again.status]).toEqual([201, 200])
    expect(again.body.waterTest.id).toBe(id)
    expect(await countTests()).toBe(before + 1)
    // Someone else's id is not theirs to reuse.
    expect((await world.vet.client.post(path(), body)).status).toBe(409)
  })
})

describe('impossible values are refused with field messages and change nothing', () => {
  it.each([
    { field: 'pH', body: { pH: 15 } },
    { field: 'tanMgL', body: { tanMgL: -0.1 } },
    { field: 'nitriteNMgL', body: { nitriteNMgL: -1 } },
    { field: 'temperatureC', body: { temperatureC: -1 } },
    { field: 'temperatureC', body: { temperatureC: 46 } },
    { field: 'dissolvedOxygenMgL', body: { dissolvedOxygenMgL: 'seven' } },
    { field: 'testedAt', body: { pH: 7, testedAt: new Date(Date.now() + 86_400_000).toISOString() } },
    { field: '_', body: {} },
  ])('$field: $body → 400', async ({ field, body }) => {
    const before = await countTests()
    const response = await world.keeper.client.post(path(), { testedAt: hoursAgo(1), ...body })
    expect(response.status, JSON.stringify(response.body)).toBe(400)
    expect(response.body.data.fieldErrors[field]?.length, JSON.stringify(response.body.data)).toBeGreaterThan(0)
    expect(await countTests()).toBe(before)
  })

  it('an unknown field is refused', async () => {
    const response = await world.keeper.client.post(path(), { testedAt: hoursAgo(1), pH: 7, ammonia: 1 })
    expect(response.status).toBe(400)
  })
})

describe('who may record and read', () => {
  const who = (name: string): ApiClient => name === 'readOnly' ? readOnly.client : world[name as 'owner'].client
  it.each([
    ['owner', 201, 200], ['keeper', 201, 200], ['vet', 201, 200], ['readOnly', 403, 200], ['outsider', 404, 404], ['anonymous', 401, 401],
  ] as const)('%s: record %i, read %i', async (name, writeStatus, readStatus) => {
    const before = await countTests()
    const write = await who(name).post(path(), { testedAt: hoursAgo(5), pH: 7.4 })
    expect(write.status, JSON.stringify(write.body)).toBe(writeStatus)
    expect(await countTests()).toBe(before + (writeStatus === 201 ? 1 : 0))
    expect((await who(name).get(path())).status).toBe(readStatus)
  })

  it('a pond that does not exist is 404 like one the caller is not in', async () => {
    expect((await world.keeper.client.get(`/api/ponds/${randomUUID()}/water-tests`)).status).toBe(404)
  })
})

describe('the pond’s target ranges', () => {
  it('owner and vet may set them, keepers read them; flags follow the pond’s own range', async () => {
    const targets = `/api/ponds/${world.pond.id}/water-targets`
    const read = await world.keeper.client.get(targets)
    expect(read.status).toBe(200)
    expect(read.body.canEdit).toBe(false)
    expect(read.body.targets.pH).toMatchObject({ low: 6.5, high: 9, from: 'default' })
    expect(read.body.targets.pH.source).toMatch(/Southern Regional Aquaculture Center/)

    expect((await world.keeper.client.put(targets, { targets: { pH: { low: 7, high: 8 } } })).status).toBe(403)
    expect((await readOnly.client.put(targets, { targets: { pH: { low: 7, high: 8 } } })).status).toBe(403)
    expect((await world.outsider.client.put(targets, { targets: { pH: { low: 7, high: 8 } } })).status).toBe(404)
    const bad = await world.vet.client.put(targets, { targets: { pH: { low: 8, high: 7 } } })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors['targets.pH.high']).toBeTruthy()

    const set = await world.vet.client.put(targets, { targets: { pH: { low: 7, high: 8 } } })
    expect(set.status, JSON.stringify(set.body)).toBe(200)
    expect(set.body.targets.pH).toMatchObject({ low: 7, high: 8, from: 'pond' })
    const test = await world.keeper.client.post(path(), { testedAt: hoursAgo(1), pH: 8.4 })
    expect(test.body.waterTest.flags.pH).toBe('high')

    const reset = await world.owner.client.put(targets, { targets: { pH: null } })
    expect(reset.body.targets.pH).toMatchObject({ low: 6.5, high: 9, from: 'default' })
  })
})

describe('the pond’s fish events for the charts', () => {
  it('lists treatments, deaths, observations and procedures of fish in this pond only', async () => {
    const entry = await world.keeper.client.post(`/api/fish/${world.fish.id}/timeline`, {
      kind: 'observation', occurredAt: hoursAgo(4), data: { signs: ['flashing'], text: '' },
    })
    expect(entry.status, JSON.stringify(entry.body)).toBe(201)
    const response = await world.keeper.client.get(`/api/ponds/${world.pond.id}/fish-events`)
    expect(response.status).toBe(200)
    expect(response.body.events).toContainEqual(expect.objectContaining({ id: entry.body.entry.id, fishId: world.fish.id, kind: 'observation', label: 'flashing' }))
    expect((await world.outsider.client.get(`/api/ponds/${world.pond.id}/fish-events`)).status).toBe(404)
  })
})

describe('the pond’s volume from measurements', () => {
  it('works the litres out from the readings and keeps the method', async () => {
    const volume = `/api/ponds/${world.pond.id}/volume`
    // NIST: 1 ft = 0.3048 m. 10 ft × 8 ft × 3 ft = 240 ft³ = 240 × 0.028316846592 m³ = 6.796043 m³ = 6796.0 L.
    const response = await world.keeper.client.put(volume, { measurement: { shape: 'rectangle', unit: 'ft', length: 10, width: 8, depth: 3, shownIn: 'us gal' } })
    expect(response.status, JSON.stringify(response.body)).toBe(200)
    expect(response.body.volumeLitres).toBeCloseTo(6796.0, 1)
    expect(response.body.volumeMeasurement).toMatchObject({ shape: 'rectangle', unit: 'ft', length: 10 })
    expect((await world.keeper.client.put(volume, { measurement: { shape: 'circle', unit: 'm', diameter: -2, depth: 1 } })).status).toBe(400)
    expect((await readOnly.client.put(volume, { measurement: { shape: 'circle', unit: 'm', diameter: 2, depth: 1 } })).status).toBe(403)
    expect((await world.outsider.client.put(volume, { measurement: { shape: 'circle', unit: 'm', diameter: 2, depth: 1 } })).status).toBe(404)
  })
})
