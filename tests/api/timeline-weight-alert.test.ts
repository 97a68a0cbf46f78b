import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { WEIGHT_LOSS_RULE, weightChangeAlert } from '../../shared/utils/condition'
import { closeTestDb, testDb } from '../support/db'
import { createFish, pondWithRoles } from '../support/factories'
import { addEntry, DAY_MS } from '../support/timeline'

afterAll(closeTestDb)

let world: Awaited<ReturnType<typeof pondWithRoles>>
beforeAll(async () => {
  world = await pondWithRoles()
})

// The fish table flags the latest weighing by the loss rule of weightChangeAlert (10 % within 90 days,
// common practice), computed in the database; at the boundaries both must give the same answer.
const start = Date.now() - 200 * DAY_MS
const cases = [
  { name: 'exactly 10 % in exactly 90 days', later: 90 * DAY_MS, from: 1000, to: 900 },
  { name: 'just under 10 %', later: 90 * DAY_MS, from: 1000, to: 900.1 },
  { name: '10 % a minute after the 90 days', later: 90 * DAY_MS + 60_000, from: 1000, to: 900 },
  { name: '15 % in a month', later: 30 * DAY_MS, from: 2000, to: 1700 },
  { name: 'a gain', later: 30 * DAY_MS, from: 2000, to: 2300 },
]

describe('the fish table’s weight-loss flag agrees with weightChangeAlert', () => {
  it.each(cases)('$name', async ({ name, later, from, to }) => {
    const fish = await createFish(world.owner.client, world.pond.id, { name })
    const first = new Date(start).toISOString()
    const second = new Date(start + later).toISOString()
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: first, data: { weightG: from } })
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: second, data: { weightG: to } })
    const expected = weightChangeAlert([{ date: first, weightG: from }, { date: second, weightG: to }]).some(a => a.kind === 'loss')
    const listed = (await world.vet.client.get(`/api/ponds/${world.pond.id}/fish`)).body.find((f: { id: string }) => f.id === fish.id)
    expect(listed.weightAlert).toBe(expected)
    const growth = (await world.vet.client.get(`/api/fish/${fish.id}/growth`)).body
    expect(growth.alerts.some((a: { kind: string }) => a.kind === 'loss')).toBe(expected)
  })

  it('has both answers for the boundary cases, so the check above can fail', () => {
    const answers = cases.map(c => weightChangeAlert([{ date: new Date(start), weightG: c.from }, { date: new Date(start + c.later), weightG: c.to }]).some(a => a.kind === 'loss'))
    expect(answers).toEqual([true, false, false, true, false])
  })
})

describe('the SQL rule reads its thresholds from the one row written from WEIGHT_LOSS_RULE', () => {
  it('holds exactly the shared numbers', async () => {
    const { rows } = await testDb().query('select loss_percent, loss_window_days from weight_loss_rule')
    expect(rows).toEqual([{ loss_percent: WEIGHT_LOSS_RULE.lossPercent, loss_window_days: WEIGHT_LOSS_RULE.lossWindowDays }])
  })

  it('follows the row: a 6 % loss is flagged only while the row says 5 %', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Rule reader' })
    const first = new Date(start).toISOString()
    const second = new Date(start + 30 * DAY_MS).toISOString()
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: first, data: { weightG: 1000 } })
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: second, data: { weightG: 940 } })
    const flag = async (q: { query: (text: string, values: unknown[]) => Promise<{ rows: { weight_alert: boolean }[] }> }) =>
      (await q.query('select weight_alert from fish_measurement_summary where fish_id = $1', [fish.id])).rows[0]!.weight_alert
    expect(await flag(testDb())).toBe(false)
    // Changed inside a transaction that is rolled back, so no other test sees the 5 %.
    const client = await testDb().connect()
    try {
      await client.query('begin')
      await client.query('update weight_loss_rule set loss_percent = 5')
      await client.query('select fintrail_refresh_measurement_summary($1)', [fish.id])
      expect(await flag(client)).toBe(true)
    }
    finally {
      await client.query('rollback')
      client.release()
    }
    expect(await flag(testDb())).toBe(false)
  })
})
