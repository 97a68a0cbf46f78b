import { randomUUID } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { addMember, createFish, createPond, pondWithRoles, signedInUser } from '../support/factories'
import { addEntry, countEntries, daysAgo } from '../support/timeline'

afterAll(closeTestDb)

type World = Awaited<ReturnType<typeof pondWithRoles>>
let world: World
beforeAll(async () => {
  world = await pondWithRoles()
})

const HOUR_MS = 3_600_000
const hoursFromNow = (hours: number) => new Date(Date.now() + hours * HOUR_MS).toISOString()

/** A course of `doseCount` doses a day apart, the first `firstHoursAgo` hours ago. */
function course(firstHoursAgo: number, doseCount = 3) {
  return {
    kind: 'treatment', occurredAt: daysAgo(2),
    data: {
      drug: 'Enrofloxacin', route: 'injection', injectionSite: 'Intramuscular, below the dorsal fin', dose: 10, doseUnit: 'mg/kg',
      startOn: daysAgo(2), doseCount, intervalHours: 24, firstDoseAt: hoursFromNow(-firstHoursAgo),
    },
  }
}

const dosesOf = async (entryId: string) => (await testDb().query('select dose_number from treatment_doses where entry_id = $1 order by dose_number', [entryId])).rows.map(r => r.dose_number)

describe('a treatment course as a schedule', () => {
  it('shows a dose whose time passed without being given as missed, on the entry and in the key facts', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Course' })
    // Doses due 36 h ago, 12 h ago and in 12 h; only the first is checked off.
    const { entry } = await addEntry(world.vet.client, fish.id, course(36))
    const given = await world.keeper.client.post(`/api/timeline/${entry.id}/doses`, { doseNumber: 1 })
    expect(given.status, JSON.stringify(given.body)).toBe(201)
    expect(given.body.dose).toMatchObject({ doseNumber: 1, givenBy: { id: world.keeper.user.id, name: 'Keeper' } })

    const onTimeline = (await world.owner.client.get(`/api/fish/${fish.id}/timeline`)).body.entries[0]
    const schedule = onTimeline.derived.schedule
    expect(schedule.slots.map((s: { state: string }) => s.state)).toEqual(['given', 'missed', 'due'])
    expect(schedule.slots[0].given.givenBy.name).toBe('Keeper')
    expect(schedule).toMatchObject({ doseCount: 3, given: 1, missed: 1, nextDueAt: schedule.slots[2].dueAt })

    const facts = (await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body
    const current = facts.treatments.find((t: { entryId: string }) => t.entryId === entry.id)
    expect(current.prescribedBy).toBe('Vet')
    expect(current.schedule).toMatchObject({ doseCount: 3, given: 1, missed: 1 })
    expect(current.schedule.missedDoses).toEqual([{ doseNumber: 2, dueAt: schedule.slots[1].dueAt }])

    // Giving the missed dose late clears it.
    await world.keeper.client.post(`/api/timeline/${entry.id}/doses`, { doseNumber: 2, note: 'Given late, at the evening feed' })
    const after = (await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body.treatments.find((t: { entryId: string }) => t.entryId === entry.id)
    expect(after.schedule).toMatchObject({ given: 2, missed: 0, missedDoses: [] })
  })

  it('checks a dose once, within the course, on a treatment that stands', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Checks' })
    const { entry } = await addEntry(world.vet.client, fish.id, course(1, 2))
    const post = (body: unknown, id = entry.id) => world.keeper.client.post(`/api/timeline/${id}/doses`, body)
    expect((await post({ doseNumber: 1 })).status).toBe(201)
    const twice = await post({ doseNumber: 1 })
    expect(twice.status).toBe(409)
    const beyond = await post({ doseNumber: 3 })
    expect(beyond.status).toBe(400)
    expect(beyond.body.data.fieldErrors.doseNumber).toEqual(['This course has 2 doses'])
    expect((await post({ doseNumber: 0 })).body.data.fieldErrors.doseNumber).toEqual(['Dose 1 is the first'])
    expect((await post({ doseNumber: 2, givenAt: hoursFromNow(5) })).body.data.fieldErrors.givenAt).toEqual(['Cannot be in the future'])
    const measurement = await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(1), data: { weightG: 900 } })
    expect((await post({ doseNumber: 1 }, measurement.entry.id)).status).toBe(400)
    await world.vet.client.post(`/api/timeline/${entry.id}/entered-in-error`, { reason: 'Wrong fish' })
    expect((await post({ doseNumber: 2 })).status).toBe(409)
    expect(await dosesOf(entry.id)).toEqual([1])
  })

  it('answers a second send of the same device-made dose id with the dose it recorded, once (an outbox retry after a lost answer)', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Retried' })
    const { entry } = await addEntry(world.vet.client, fish.id, course(30, 3))
    const id = randomUUID()
    const givenAt = hoursFromNow(-1)
    const post = (body: unknown, client = world.keeper.client) => client.post(`/api/timeline/${entry.id}/doses`, body)
    const first = await post({ id, doseNumber: 2, givenAt, note: 'Ticked at the pond with no signal' })
    expect(first.status, JSON.stringify(first.body)).toBe(201)
    const again = await post({ id, doseNumber: 2, givenAt, note: 'Ticked at the pond with no signal' })
    expect(again.status, JSON.stringify(again.body)).toBe(200)
    expect(again.body.dose).toEqual(first.body.dose)
    expect(again.body.dose.givenAt).toBe(givenAt)
    const { rows } = await testDb().query('select id, dose_number, given_by_id from treatment_doses where entry_id = $1', [entry.id])
    expect(rows).toEqual([{ id, dose_number: 2, given_by_id: world.keeper.user.id }])
    // A fresh tick of the same dose (another id) is still "already given"; the same id cannot stand for another dose or person.
    expect((await post({ id: randomUUID(), doseNumber: 2 })).status).toBe(409)
    const otherDose = await post({ id, doseNumber: 3 })
    expect(otherDose.status).toBe(409)
    expect(otherDose.body.message).toBe('This dose id belongs to another dose')
    expect((await post({ id, doseNumber: 2 }, world.owner.client)).status).toBe(409)
    expect((await post({ id: 'not-an-id', doseNumber: 3 })).body.data.fieldErrors.id).toEqual(['Not a valid id'])
    expect(await dosesOf(entry.id)).toEqual([2])
  })

  it('lets every member of the pond check off a dose, and nobody else', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Matrix' })
    const { entry } = await addEntry(world.vet.client, fish.id, course(1, 5))
    const formerVet = await signedInUser({ name: 'Former vet' })
    await addMember(world.pond.id, formerVet.user.id, 'vet')
    await testDb().query('update memberships set read_only = true where pond_id = $1 and user_id = $2', [world.pond.id, formerVet.user.id])
    const cases = [
      { who: world.owner.client, dose: 1, status: 201 },
      { who: world.keeper.client, dose: 2, status: 201 },
      { who: world.vet.client, dose: 3, status: 201 },
      { who: world.outsider.client, dose: 4, status: 404 },
      { who: world.anonymous.client, dose: 4, status: 401 },
      { who: formerVet.client, dose: 4, status: 403 },
    ]
    for (const { who, dose, status } of cases) {
      const response = await who.post(`/api/timeline/${entry.id}/doses`, { doseNumber: dose })
      expect(response.status, JSON.stringify(response.body)).toBe(status)
    }
    expect(await dosesOf(entry.id)).toEqual([1, 2, 3])
  })
})

describe('treatments given on a vet’s instruction', () => {
  it('need a vet of this pond, and the list shows who prescribed it', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Instructed' })
    const otherPond = await createPond(world.outsider.client)
    const strangerVet = await signedInUser({ name: 'Vet elsewhere' })
    await addMember(otherPond.id, strangerVet.user.id, 'vet')
    const given = (instructedById?: string) => ({
      kind: 'treatment', occurredAt: daysAgo(0),
      data: { drug: 'Salt (sodium chloride)', route: 'tank_bath', exposureMinutes: 30, dose: 10, doseUnit: 'g/L', startOn: daysAgo(0), durationDays: 3, volumeTreatedL: 200, amountAdded: 2, amountAddedUnit: 'kg', givenBy: 'Keeper', ...(instructedById ? { instructedById } : {}) },
    })
    for (const id of [undefined, world.keeper.user.id, strangerVet.user.id, '00000000-0000-4000-8000-000000000000']) {
      const before = await countEntries(fish.id)
      const response = await world.keeper.client.post(`/api/fish/${fish.id}/timeline`, given(id))
      expect(response.status, `${id}: ${JSON.stringify(response.body)}`).toBe(400)
      expect(response.body.data.fieldErrors['data.instructedById'][0]).toMatch(/pond’s vets/)
      expect(await countEntries(fish.id)).toBe(before)
    }
    const { entry } = await addEntry(world.keeper.client, fish.id, given(world.vet.user.id))
    expect(entry.data).toMatchObject({ instructedById: world.vet.user.id, instructedBy: 'Vet', volumeTreatedL: 200, amountAdded: 2, amountAddedUnit: 'kg' })
    // The owner may record what they gave on instruction too.
    await addEntry(world.owner.client, fish.id, given(world.vet.user.id))
    const facts = (await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body
    expect(facts.treatments.map((t: { prescribedBy: string }) => t.prescribedBy)).toEqual(['Vet', 'Vet'])
  })

  it('refuses a dip or a hospital-tank bath without the exposure time, naming the field', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Dipped' })
    for (const route of ['dip', 'tank_bath']) {
      const response = await world.vet.client.post(`/api/fish/${fish.id}/timeline`, {
        kind: 'treatment', occurredAt: daysAgo(0), data: { drug: 'Potassium permanganate', route, dose: 10, doseUnit: 'mg/L', startOn: daysAgo(0) },
      })
      expect(response.status).toBe(400)
      expect(response.body.data.fieldErrors['data.exposureMinutes']).toEqual(['Give how many minutes the fish stays in the solution'])
    }
    expect(await countEntries(fish.id)).toBe(0)
  })
})
