import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { createFish, pondWithRoles, TEST_PASSWORD, uniqueEmail } from '../support/factories'
import { uploadSheet } from '../support/spreadsheets'
import { daysAgo } from '../support/timeline'

afterAll(closeTestDb)

let world: Awaited<ReturnType<typeof pondWithRoles>>
beforeAll(async () => {
  world = await pondWithRoles()
})

async function storedData(entryId: string) {
  const { rows } = await testDb().query('select data from timeline_entries where id = $1', [entryId])
  return rows[0]?.data as Record<string, unknown> | undefined
}

async function entryCount(fishId: string) {
  const { rows } = await testDb().query(`select count(*)::int as n from timeline_entries where fish_id = $1 and kind = 'measurement'`, [fishId])
  return rows[0].n as number
}

describe('the person\'s decimal mark', () => {
  it('is a point unless the sign-up says otherwise, and can be changed on the account', async () => {
    const point = new ApiClient()
    expect((await point.post('/api/auth/sign-up', { name: 'Point', email: uniqueEmail(), password: TEST_PASSWORD })).body.decimalMark).toBe('point')
    const comma = new ApiClient()
    const signUp = await comma.post('/api/auth/sign-up', { name: 'Comma', email: uniqueEmail(), password: TEST_PASSWORD, decimalMark: 'comma' })
    expect(signUp.status).toBe(201)
    expect((await comma.get('/api/me')).body).toMatchObject({ decimalMark: 'comma' })
    const changed = await comma.patch('/api/me', { decimalMark: 'point' })
    expect(changed.status).toBe(200)
    expect((await comma.get('/api/me')).body.decimalMark).toBe('point')
    const bad = await comma.patch('/api/me', { decimalMark: 'space' })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.decimalMark).toBeDefined()
  })
})

describe('numbers reach the server as numbers', () => {
  it('refuses a weight sent as text, so "1,25" can never be read by the server', async () => {
    for (const weightG of ['1,250', '1,25', '1250']) {
      const response = await world.keeper.client.post(`/api/fish/${world.fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(1), data: { weightG } })
      expect(response.status).toBe(400)
      expect(response.body.data.fieldErrors['data.weightG']).toBeDefined()
    }
    expect(await entryCount(world.fish.id)).toBe(0)
  })
})

describe('plausibility warnings on a new measurement (thresholds: common practice)', () => {
  it('answers 409 with the warnings and writes nothing, then saves them with the entry once acknowledged', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { hatchYear: 2016 })
    const first = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(20), data: { weightG: 1000, lengthCm: 40 } })
    expect(first.status, JSON.stringify(first.body)).toBe(201) // K = 100 · 1000 / 40³ = 1.56: usual
    expect(await storedData(first.body.entry.id)).not.toHaveProperty('warnings')

    // 1.25 g, as "1,25" would have been read by a comma-replacing form: −99.9 % in 10 days, K = 0.002.
    const id = randomUUID()
    const entry = { id, kind: 'measurement', occurredAt: daysAgo(10), data: { weightG: 1.25, lengthCm: 40 } }
    const refused = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, entry)
    expect(refused.status).toBe(409)
    expect(refused.body.warnings.map((w: { code: string }) => w.code).sort()).toEqual(['condition_factor', 'weight_jump'])
    const jump = refused.body.warnings.find((w: { code: string }) => w.code === 'weight_jump')
    expect(jump).toMatchObject({ value: 1.25, earlierValue: 1000, earlierAt: daysAgo(20) })
    expect(jump.message).toContain('1.00 kg')
    expect(await storedData(id)).toBeUndefined()
    expect(await entryCount(fish.id)).toBe(1)

    // Acknowledging only one of two warnings is not enough.
    const half = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, { ...entry, acknowledgedWarnings: ['weight_jump'] })
    expect(half.status).toBe(409)

    const saved = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, { ...entry, acknowledgedWarnings: ['weight_jump', 'condition_factor'] })
    expect(saved.status, JSON.stringify(saved.body)).toBe(201)
    const stored = await storedData(id)
    expect(stored!.weightG).toBe(1.25)
    expect((stored!.warnings as { code: string }[]).map(w => w.code).sort()).toEqual(['condition_factor', 'weight_jump'])
    expect(saved.body.entry.data.warnings).toHaveLength(2)

    // The same send again (a lost answer): the entry it wrote is the answer, nothing new.
    const retried = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, { ...entry, acknowledgedWarnings: ['weight_jump', 'condition_factor'] })
    expect(retried.status).toBe(200)
    expect(retried.body.entry.id).toBe(id)
    // Even a retry without the acknowledgement finds the saved entry rather than warning again.
    expect((await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, entry)).status).toBe(200)
    expect(await entryCount(fish.id)).toBe(2)
  })

  it('ignores warnings a client writes itself: the server stores only what it found', async () => {
    const fish = await createFish(world.owner.client, world.pond.id)
    const forged = { code: 'weight_jump', message: 'Nothing to see' }
    const response = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(1), data: { weightG: 1000, lengthCm: 40, warnings: [forged] } })
    expect(response.status).toBe(201)
    expect(await storedData(response.body.entry.id)).not.toHaveProperty('warnings')
  })

  it('checks an amendment the same way', async () => {
    const fish = await createFish(world.owner.client, world.pond.id)
    await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(20), data: { lengthCm: 50 } })
    const later = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: daysAgo(5), data: { lengthCm: 50.5 } })
    const amend = { revision: 1, reason: 'Measured again', data: { lengthCm: 45 } } // 10 % shorter than 15 days before
    const refused = await world.keeper.client.post(`/api/timeline/${later.body.entry.id}/amend`, amend)
    expect(refused.status).toBe(409)
    expect(refused.body.warnings[0]).toMatchObject({ code: 'length_shrank', value: 45, earlierValue: 50 })
    expect((await storedData(later.body.entry.id))!.lengthCm).toBe(50.5)
    const saved = await world.keeper.client.post(`/api/timeline/${later.body.entry.id}/amend`, { ...amend, acknowledgedWarnings: ['length_shrank'] })
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    expect((await storedData(later.body.entry.id))!.warnings).toHaveLength(1)
  })
})

describe('the spreadsheet import reads numbers with the importer\'s decimal mark', () => {
  // Each test its own day: a row imported once is skipped as already imported afterwards.
  const csv = (weight: string, day = '2024-03-01') => `Fish,Date,Weight (g)\nImported,${day},"${weight}"\n`
  const mapping = { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', dateFormat: 'YYYY-MM-DD', weightColumn: 'Weight (g)', weightUnit: 'g' }

  it('reads "1,250" as 1250 g for a point reader and refuses "1,25" with a message saying how to write it', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Imported' })
    const url = `/api/ponds/${world.pond.id}/measurement-imports`
    const ambiguous = await uploadSheet(world.keeper.client, `${url}/preview`, { name: 'w.csv', data: csv('1,25') }, { mapping })
    expect(ambiguous.status, JSON.stringify(ambiguous.body)).toBe(200)
    expect(ambiguous.body.readyCount).toBe(0)
    expect(ambiguous.body.problems[0]).toMatchObject({ row: 2, reason: 'not_a_number' })
    expect(ambiguous.body.problems[0].message).toContain('1.25')

    const grouped = await uploadSheet(world.keeper.client, url, { name: 'w.csv', data: csv('1,250') }, { mapping })
    expect(grouped.status, JSON.stringify(grouped.body)).toBe(201)
    expect(grouped.body.importedCount).toBe(1)
    const { rows } = await testDb().query(`select data from timeline_entries where fish_id = $1 and kind = 'measurement'`, [fish.id])
    expect(rows.map(r => r.data.weightG)).toEqual([1250])
  })

  it('reads "1,25" as 1.25 for a comma reader, or when the mapping says the file writes a comma', async () => {
    const url = `/api/ponds/${world.pond.id}/measurement-imports/preview`
    const kg = { ...mapping, weightUnit: 'kg' }
    const byMapping = await uploadSheet(world.keeper.client, url, { name: 'w.csv', data: csv('1,25', '2024-04-01') }, { mapping: { ...kg, decimalSeparator: ',' } })
    expect(byMapping.body.sample[0]).toMatchObject({ weightG: 1250 })
    await world.keeper.client.patch('/api/me', { decimalMark: 'comma' })
    try {
      const byAccount = await uploadSheet(world.keeper.client, url, { name: 'w.csv', data: csv('1,25', '2024-04-01') }, { mapping: kg })
      expect(byAccount.body.sample[0]).toMatchObject({ weightG: 1250 })
      const pointFile = await uploadSheet(world.keeper.client, url, { name: 'w.csv', data: csv('1,25', '2024-04-01') }, { mapping: { ...kg, decimalSeparator: '.' } })
      expect(pointFile.body.problems[0]).toMatchObject({ reason: 'not_a_number' })
    }
    finally {
      await world.keeper.client.patch('/api/me', { decimalMark: 'point' })
    }
  })

  it('flags implausible rows by the same rule as the form and imports them only when confirmed', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Flagged', hatchYear: 2016 })
    const url = `/api/ponds/${world.pond.id}/measurement-imports`
    // Row 3: 2.6 kg ten days after 1 kg (+160 %, over 30 % in 30 days; common practice). Header unit "(g)" needs no mapping unit.
    const sheet = { name: 'f.csv', data: 'Fish,Date,Weight (g)\nFlagged,2024-05-01,1000\nFlagged,2024-05-11,2600\n' }
    const plain = { fishColumn: 'Fish', fishMatch: 'name', dateColumn: 'Date', dateFormat: 'YYYY-MM-DD', weightColumn: 'Weight (g)' }
    const preview = await uploadSheet(world.keeper.client, `${url}/preview`, sheet, { mapping: plain })
    expect(preview.status, JSON.stringify(preview.body)).toBe(200)
    expect(preview.body).toMatchObject({ readyCount: 1, warningsAcknowledged: false })
    expect(preview.body.flagged).toHaveLength(1)
    expect(preview.body.flagged[0]).toMatchObject({ row: 3, fishName: 'Flagged', date: '2024-05-11' })
    expect(preview.body.flagged[0].warnings[0]).toMatchObject({ code: 'weight_jump', value: 2600, earlierValue: 1000 })

    const held = await uploadSheet(world.keeper.client, url, sheet, { mapping: plain })
    expect(held.body.importedCount).toBe(1)
    const confirmed = await uploadSheet(world.keeper.client, url, sheet, { mapping: plain, acknowledgeWarnings: 'true' })
    expect(confirmed.status, JSON.stringify(confirmed.body)).toBe(201)
    expect(confirmed.body.importedCount).toBe(1)
    const { rows } = await testDb().query(`select data from timeline_entries where fish_id = $1 and kind = 'measurement' order by occurred_at`, [fish.id])
    expect(rows.map(r => r.data.weightG)).toEqual([1000, 2600])
    expect(rows[1].data.warnings.map((w: { code: string }) => w.code)).toEqual(['weight_jump'])
  })
})
