import { afterAll, describe, expect, it } from 'vitest'
import type { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { addMember, createFish, createPond, pondWithRoles, signedInUser } from '../support/factories'

afterAll(closeTestDb)

const yesterday = () => new Date(Date.now() - 86_400_000).toISOString().slice(0, 10)

async function timelineKinds(client: ApiClient, fishId: string) {
  const response = await client.get(`/api/fish/${fishId}/timeline?limit=200`)
  expect(response.status).toBe(200)
  return response.body.entries as { id: string, kind: string, data: Record<string, unknown> }[]
}

async function move(client: ApiClient, fishId: string, toPondId: string) {
  const response = await client.post(`/api/fish/${fishId}/move`, { toPondId })
  expect(response.status, JSON.stringify(response.body)).toBe(200)
}

// 0.3 % salt in 5,000 L: 3 g/L × 5,000 L = 15 kg (worked by hand).
const saltFor5000 = { kind: 'salt', data: { percent: 0.3, amountKg: 15 } }

describe('a whole-pond event reaches exactly the fish living in the pond at that moment', () => {
  it('shows on the resident fish, not on one that moved out before it nor one that moved in after it', async () => {
    const owner = await signedInUser({ name: 'Pond owner' })
    const upper = await createPond(owner.client, { name: 'Upper pond', volumeLitres: 5000 })
    const lower = await createPond(owner.client, { name: 'Lower pond', volumeLitres: 8000 })
    const stays = await createFish(owner.client, upper.id, { name: 'Stays' })
    const leaver = await createFish(owner.client, upper.id, { name: 'Leaver' })
    const arrival = await createFish(owner.client, lower.id, { name: 'Arrival' })
    await move(owner.client, leaver.id, lower.id)

    // The fish treatment rule: an owner records a pond treatment only on the instruction of one of the pond's vets.
    const vet = await signedInUser({ name: 'Dr Vale' })
    const salted = await owner.client.post(`/api/ponds/${upper.id}/events`, { ...saltFor5000, occurredAt: new Date().toISOString(), data: { ...saltFor5000.data, instructedById: vet.user.id } })
    expect(salted.status, JSON.stringify(salted.body)).toBe(400) // not yet a vet of this pond
    expect(salted.body.data.fieldErrors['data.instructedById']).toEqual(['Choose one of the pond’s vets'])
    await addMember(upper.id, vet.user.id, 'vet')
    const given = await vet.client.post(`/api/ponds/${upper.id}/events`, { ...saltFor5000, occurredAt: new Date().toISOString() })
    expect(given.status, JSON.stringify(given.body)).toBe(201)
    expect(given.body.event).toMatchObject({ kind: 'salt', volumeLitres: 5000, data: { percent: 0.3, amountKg: 15 }, fish: [{ id: stays.id, name: 'Stays' }] })
    await move(owner.client, arrival.id, upper.id)

    const onStays = (await timelineKinds(owner.client, stays.id)).filter(e => e.kind === 'pond_event')
    expect(onStays.map(e => e.id)).toEqual([given.body.event.id])
    expect(onStays[0]!.data).toMatchObject({ eventKind: 'salt', volumeLitres: 5000, amountKg: 15, pondName: 'Upper pond' })
    expect((await timelineKinds(owner.client, leaver.id)).some(e => e.kind === 'pond_event')).toBe(false)
    expect((await timelineKinds(owner.client, arrival.id)).some(e => e.kind === 'pond_event')).toBe(false)

    // The pond page lists the event with the fish it reached, and now the arrival too is resident.
    const listed = await owner.client.get(`/api/ponds/${upper.id}/events`)
    expect(listed.body.events.map((e: { id: string, fish: { name: string }[] }) => [e.id, e.fish.map(f => f.name)])).toEqual([[given.body.event.id, ['Stays']]])
    const changed = await owner.client.post(`/api/ponds/${upper.id}/events`, { kind: 'water_change', occurredAt: new Date().toISOString(), data: { litresChanged: 1000 } })
    expect(changed.status, JSON.stringify(changed.body)).toBe(201)
    expect(changed.body.event.fish.map((f: { name: string }) => f.name).sort()).toEqual(['Arrival', 'Stays'])
    expect((await timelineKinds(owner.client, arrival.id)).filter(e => e.kind === 'pond_event').map(e => e.id)).toEqual([changed.body.event.id])
  })

  it('counts a fish from its acquired day, and not after its death', async () => {
    const { owner, vet, pond } = await pondWithRoles()
    const longTimer = await createFish(owner.client, pond.id, { name: 'Old hand', acquiredOn: '2019-05-01' })
    const newcomer = await createFish(owner.client, pond.id, { name: 'Newcomer' })
    const died = await createFish(owner.client, pond.id, { name: 'Gone', acquiredOn: '2019-05-01' })
    expect((await vet.client.post(`/api/fish/${died.id}/timeline`, { kind: 'death', occurredAt: '2024-06-01', data: { cause: 'Old age' } })).status).toBe(201)
    const loss = await owner.client.post(`/api/ponds/${pond.id}/events`, { kind: 'mortality', occurredAt: yesterday(), data: { count: 2, cause: 'Heron' } })
    expect(loss.status, JSON.stringify(loss.body)).toBe(201)
    // Newcomer was registered today with no acquired date: it arrived today, after yesterday's losses.
    expect(loss.body.event.fish.map((f: { id: string }) => f.id)).toEqual([longTimer.id])
    expect((await timelineKinds(owner.client, newcomer.id)).some(e => e.kind === 'pond_event')).toBe(false)
    expect((await timelineKinds(owner.client, died.id)).some(e => e.kind === 'pond_event')).toBe(false)
  })
})

describe('who may record a whole-pond event', () => {
  it('follows the fish treatment rule for salt and baths, and lets any member record a water change', async () => {
    const { owner, keeper, vet, outsider, pond } = await pondWithRoles()
    const now = () => new Date().toISOString()
    const keeperBare = await keeper.client.post(`/api/ponds/${pond.id}/events`, { ...saltFor5000, occurredAt: now() })
    expect(keeperBare.status).toBe(400)
    expect(keeperBare.body.data.fieldErrors['data.instructedById']).toBeTruthy()
    const keeperOnInstruction = await keeper.client.post(`/api/ponds/${pond.id}/events`, { ...saltFor5000, occurredAt: now(), data: { ...saltFor5000.data, instructedById: vet.user.id, instructedBy: 'Somebody else' } })
    expect(keeperOnInstruction.status, JSON.stringify(keeperOnInstruction.body)).toBe(201)
    // The vet's name comes from the pond's membership, never from the body.
    expect(keeperOnInstruction.body.event.data).toMatchObject({ instructedById: vet.user.id, instructedBy: 'Vet' })
    expect((await vet.client.post(`/api/ponds/${pond.id}/events`, { kind: 'bath', occurredAt: now(), data: { drug: 'Potassium permanganate', concentration: 2, concentrationUnit: 'mg/L', amount: 10, amountUnit: 'g' } })).status).toBe(201)
    expect((await owner.client.post(`/api/ponds/${pond.id}/events`, { kind: 'water_change', occurredAt: now(), data: { litresChanged: 500 } })).status).toBe(201)
    expect((await outsider.client.post(`/api/ponds/${pond.id}/events`, { kind: 'water_change', occurredAt: now(), data: { litresChanged: 500 } })).status).toBe(404)
    expect((await outsider.client.get(`/api/ponds/${pond.id}/events`)).status).toBe(404)
    await testDb().query('update memberships set read_only = true where pond_id = $1 and user_id = $2', [pond.id, keeper.user.id])
    expect((await keeper.client.post(`/api/ponds/${pond.id}/events`, { kind: 'water_change', occurredAt: now(), data: { litresChanged: 500 } })).status).toBe(403)
    expect((await keeper.client.get(`/api/ponds/${pond.id}/events`)).status).toBe(200)
  })
})

describe('checking what is typed', () => {
  it('refuses impossible values with field messages and asks before saving unusual ones', async () => {
    const { vet, pond } = await pondWithRoles()
    const count = async () => Number((await testDb().query('select count(*) from pond_events where pond_id = $1', [pond.id])).rows[0].count)
    const impossible = await vet.client.post(`/api/ponds/${pond.id}/events`, { kind: 'salt', occurredAt: yesterday(), data: { percent: 5, amountKg: -1 } })
    expect(impossible.status).toBe(400)
    expect(Object.keys(impossible.body.data.fieldErrors).sort()).toEqual(['data.amountKg', 'data.percent'])
    const noDrug = await vet.client.post(`/api/ponds/${pond.id}/events`, { kind: 'bath', occurredAt: yesterday(), data: { concentration: 2, concentrationUnit: 'mg/L', amount: 10, amountUnit: 'g' } })
    expect(noDrug.status).toBe(400)
    expect(noDrug.body.data.fieldErrors['data.drug']).toBeTruthy()

    // 0.3 % in 5,000 L is 15 kg; 150 kg is a slip of a digit: asked first, saved only when confirmed.
    const slip = { kind: 'salt', occurredAt: yesterday(), data: { percent: 0.3, amountKg: 150 } }
    const asked = await vet.client.post(`/api/ponds/${pond.id}/events`, slip)
    expect(asked.status).toBe(409)
    expect(asked.body.data.warnings[0]).toMatchObject({ field: 'data.amountKg' })
    expect(asked.body.data.warnings[0].message).toContain('15 kg')
    expect(await count()).toBe(0)
    expect((await vet.client.post(`/api/ponds/${pond.id}/events`, { ...slip, confirmUnusual: true })).status).toBe(201)
    expect(await count()).toBe(1)
  })

  it('keeps a wrong event, struck through with its reason, and never deletes it', async () => {
    const { owner, keeper, pond } = await pondWithRoles()
    const saved = await keeper.client.post(`/api/ponds/${pond.id}/events`, { kind: 'water_change', occurredAt: yesterday(), data: { litresChanged: 700 } })
    const url = `/api/ponds/${pond.id}/events/${saved.body.event.id}/entered-in-error`
    expect((await owner.client.post(url, { reason: 'x' })).status).toBe(400)
    const marked = await owner.client.post(url, { reason: 'Recorded on the wrong pond' })
    expect(marked.status, JSON.stringify(marked.body)).toBe(200)
    expect(marked.body.event).toMatchObject({ enteredInError: true, errorReason: 'Recorded on the wrong pond' })
    await expect(testDb().query('delete from pond_events where id = $1', [saved.body.event.id])).rejects.toThrow(/never deleted/)
  })
})
