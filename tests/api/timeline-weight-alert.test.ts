import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { weightChangeAlert } from '../../shared/utils/condition'
import { closeTestDb } from '../support/db'
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
