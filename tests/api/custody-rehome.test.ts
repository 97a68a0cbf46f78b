import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { addMember, createFish, createPond, pondWithRoles, signedInUser, TEST_PASSWORD, uniqueEmail } from '../support/factories'
import { entriesOfKind, insertReadyPhoto, offerPond, tokenFromMail } from '../support/custody'

afterAll(closeTestDb)

const day = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10)
const today = () => new Date().toISOString().slice(0, 10)

async function linkCompanions(client: ApiClient, fishId: string, relatedFishId: string) {
  const response = await client.post(`/api/fish/${fishId}/timeline`, { kind: 'companion', occurredAt: day(30), data: { relatedFishId, relation: 'leads', note: 'Leads the blind one to food' } })
  expect(response.status, JSON.stringify(response.body)).toBe(201)
}

async function offerFish(owner: ApiClient, fishId: string, email: string, confirmSeparation = false) {
  const since = new Date()
  const response = await owner.post(`/api/fish/${fishId}/transfers`, { email, confirmSeparation })
  expect(response.status, JSON.stringify(response.body)).toBe(201)
  return { id: response.body.id as string, token: await tokenFromMail(email, 'offers you the fish', '/transfers/', since) }
}

async function pondOf(fishId: string) {
  const { rows } = await testDb().query('select pond_id from fish where id = $1', [fishId])
  return rows[0].pond_id as string
}

describe('moving a fish to another pond of the same owner', () => {
  it('takes its whole history along, asks before separating companions and notes the separation on the one left behind', async () => {
    const { owner, keeper, pond, fish } = await pondWithRoles()
    const garden = await createPond(owner.client, { name: 'Garden pond' })
    const guide = await createFish(owner.client, pond.id, { name: 'Bramble' })
    await linkCompanions(owner.client, guide.id, fish.id)
    expect((await keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: day(60), data: { weightG: 900, lengthCm: 38 } })).status).toBe(201)
    const photoId = await insertReadyPhoto(fish.id, owner.user.id, `${day(20)}T08:00:00.000Z`)
    const before = (await owner.client.get(`/api/fish/${fish.id}/timeline?limit=200`)).body.entries as { id: string, author: { name: string } }[]

    expect((await owner.client.get(`/api/fish/${guide.id}/facts`)).body.companions.map((c: { fish: { id: string } }) => c.fish.id)).toEqual([fish.id])
    const asked = await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: garden.id })
    expect(asked.status).toBe(409)
    expect(asked.body.message).toMatch(/Bramble is linked to .* by companion notes/)
    expect(asked.body.data).toMatchObject({ needsConfirmation: true, companions: [{ id: guide.id, name: 'Bramble' }] })
    expect(await pondOf(fish.id)).toBe(pond.id)
    expect(await entriesOfKind(fish.id, 'move')).toEqual([])

    const moved = await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: garden.id, confirmSeparation: true })
    expect(moved.status, JSON.stringify(moved.body)).toBe(200)
    expect(moved.body).toMatchObject({ fishId: fish.id, pondId: garden.id, separatedFrom: [{ id: guide.id, name: 'Bramble' }] })
    expect(await pondOf(fish.id)).toBe(garden.id)

    // Entries and photos key on the fish: all of them are still there, each still naming the pond it was written in.
    const after = (await owner.client.get(`/api/fish/${fish.id}/timeline?limit=200`)).body.entries as { id: string, kind: string, author: { name: string }, data: Record<string, unknown> }[]
    expect(after.filter(e => e.kind !== 'move').map(e => [e.id, e.author.name])).toEqual(before.map(e => [e.id, e.author.name]))
    expect(after.some(e => e.id === photoId)).toBe(true)
    expect(after.find(e => e.kind === 'move')!.data).toMatchObject({ fromPond: { id: pond.id, name: pond.name }, toPond: { id: garden.id, name: 'Garden pond' } })
    const { rows: ponds } = await testDb().query(`select distinct pond_id from timeline_entries where fish_id = $1 and kind <> 'move'`, [fish.id])
    expect(ponds).toEqual([{ pond_id: pond.id }])
    const [move] = await entriesOfKind(fish.id, 'move')
    expect(move!.revisions).toBe(1)

    // The companion left behind gets a note of the separation, in the observation's own shape.
    const separation = (await entriesOfKind(guide.id, 'observation')).at(-1)!
    expect(separation.data).toEqual({ signs: [], text: `Separated from ${fish.name}: it moved to Garden pond on ${today()}.` })
    expect((await keeper.client.get(`/api/fish/${guide.id}/timeline`)).body.entries[0].data.text).toMatch(/^Separated from/)

    // Once apart they are no longer each other's standing companions.
    expect((await owner.client.get(`/api/fish/${guide.id}/facts`)).body.companions).toEqual([])
    expect((await owner.client.get(`/api/fish/${fish.id}/facts`)).body.companions).toEqual([])

    // The keeper of the old pond no longer sees the fish; the profile lists where it has lived.
    expect((await keeper.client.get(`/api/fish/${fish.id}`)).status).toBe(404)
    const residences = await owner.client.get(`/api/fish/${fish.id}/residences`)
    expect(residences.body).toEqual([
      { pondId: pond.id, pondName: pond.name, from: today(), until: today(), current: false, visible: true },
      { pondId: garden.id, pondName: 'Garden pond', from: today(), until: null, current: true, visible: true },
    ])
    const history = (await owner.client.get(`/api/fish/${fish.id}/history`)).body as { changes: { field: string, from: string, to: string }[] }[]
    expect(history[0]!.changes).toEqual([{ field: 'pond', from: pond.name, to: 'Garden pond' }])
    const outAudit = (await owner.client.get(`/api/ponds/${pond.id}/audit`)).body.events[0]
    expect(outAudit).toMatchObject({ action: 'fish.moved_out', details: { fishId: fish.id, toPondName: 'Garden pond' } })
    expect((await owner.client.get(`/api/ponds/${garden.id}/audit`)).body.events[0].action).toBe('fish.moved_in')
  })

  it('lists residences from the acquired date across several moves, oldest first', async () => {
    const owner = await signedInUser()
    const [a, b, c] = [await createPond(owner.client, { name: 'A' }), await createPond(owner.client, { name: 'B' }), await createPond(owner.client, { name: 'C' })]
    const fish = await createFish(owner.client, a.id, { acquiredOn: '2019-05-04' })
    for (const target of [b, c, a]) expect((await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: target.id })).status).toBe(200)
    const residences = (await owner.client.get(`/api/fish/${fish.id}/residences`)).body as { pondName: string, from: string, until: string | null }[]
    expect(residences.map(r => [r.pondName, r.from, r.until])).toEqual([
      ['A', '2019-05-04', today()], ['B', today(), today()], ['C', today(), today()], ['A', today(), null],
    ])
  })

  it('answers each caller who may not move the fish with the exact status', async () => {
    const { owner, keeper, vet, outsider, anonymous, pond, fish } = await pondWithRoles()
    const mine = await createPond(owner.client)
    const keptOnly = await createPond(outsider.client)
    await addMember(keptOnly.id, owner.user.id, 'keeper')
    const strangers = await createPond(outsider.client)
    for (const [client, status] of [[keeper.client, 403], [vet.client, 403], [outsider.client, 404], [anonymous.client, 401]] as const) {
      expect((await client.post(`/api/fish/${fish.id}/move`, { toPondId: mine.id })).status).toBe(status)
    }
    expect((await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: keptOnly.id })).status).toBe(403)
    expect((await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: strangers.id })).status).toBe(404)
    const same = await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: pond.id })
    expect(same.status).toBe(400)
    expect(same.body.data.fieldErrors.toPondId).toEqual(['The fish already lives in this pond'])
    expect((await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: 'nowhere' })).body.data.fieldErrors.toPondId).toBeDefined()
    expect(await pondOf(fish.id)).toBe(pond.id)
  })
})

describe('rehoming a fish with another owner', () => {
  it('goes through the mailed offer: the new owner takes it into a new pond of theirs, with its whole history', async () => {
    const { owner, keeper, pond, fish } = await pondWithRoles()
    expect((await keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: day(90), data: { weightG: 1500 } })).status).toBe(201)
    const email = uniqueEmail('adopter')
    const offer = await offerFish(owner.client, fish.id, email)
    expect((await owner.client.get(`/api/fish/${fish.id}/transfers`)).body.map((o: { id: string }) => o.id)).toEqual([offer.id])
    const info = await new ApiClient().get(`/api/transfers/${offer.token}`)
    expect(info.body).toMatchObject({ fishName: fish.name, species: 'koi', fromPondName: pond.name, fromName: 'Owner', email, state: 'open' })
    expect(await pondOf(fish.id)).toBe(pond.id)

    const adopter = new ApiClient()
    expect((await adopter.post('/api/auth/sign-up', { name: 'Adopter', email, password: TEST_PASSWORD })).status).toBe(201)
    expect((await adopter.post(`/api/transfers/${offer.token}/accept`, {})).status).toBe(400)
    const accepted = await adopter.post(`/api/transfers/${offer.token}/accept`, { newPondName: 'Quarry pond' })
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200)
    const newPondId = accepted.body.pondId as string
    expect(await pondOf(fish.id)).toBe(newPondId)
    expect((await adopter.get(`/api/ponds/${newPondId}`)).body).toMatchObject({ name: 'Quarry pond', role: 'owner' })

    const timeline = (await adopter.get(`/api/fish/${fish.id}/timeline`)).body.entries as { kind: string, author: { name: string }, data: Record<string, unknown> }[]
    expect(timeline.find(e => e.kind === 'measurement')).toMatchObject({ author: { name: 'Keeper' }, data: { weightG: 1500 } })
    expect(timeline.find(e => e.kind === 'move')).toMatchObject({ author: { name: 'Adopter' }, data: { fromOwner: 'Owner', toOwner: 'Adopter', toPond: { name: 'Quarry pond' } } })
    for (const formerMember of [owner, keeper]) expect((await formerMember.client.get(`/api/fish/${fish.id}`)).status).toBe(404)
    const residences = (await adopter.get(`/api/fish/${fish.id}/residences`)).body as { pondName: string, visible: boolean, current: boolean }[]
    expect(residences.map(r => [r.pondName, r.visible, r.current])).toEqual([[pond.name, false, false], ['Quarry pond', true, true]])
    const audit = (await owner.client.get(`/api/ponds/${pond.id}/audit`)).body.events.map((e: { action: string }) => e.action)
    expect(audit.slice(0, 2)).toEqual(['fish.moved_out', 'fish.transfer_offered'])
    expect((await adopter.post(`/api/transfers/${offer.token}/accept`, { newPondName: 'Again' })).status).toBe(409)
    expect((await new ApiClient().get(`/api/transfers/${offer.token}`)).body.state).toBe('accepted')
  })

  it('asks the sender to confirm a separation, and the one left behind hears of it when the fish goes', async () => {
    const { owner, pond, fish } = await pondWithRoles()
    const friend = await createFish(owner.client, pond.id, { name: 'Shadow' })
    await linkCompanions(owner.client, fish.id, friend.id)
    const email = uniqueEmail('adopter')
    const unconfirmed = await owner.client.post(`/api/fish/${fish.id}/transfers`, { email })
    expect(unconfirmed.status).toBe(409)
    expect(unconfirmed.body.data.companions).toEqual([{ id: friend.id, name: 'Shadow' }])
    const offer = await offerFish(owner.client, fish.id, email, true)
    const adopter = await signedInUser({ name: 'Adopter', email })
    const home = await createPond(adopter.client, { name: 'Adopter pond' })
    expect((await adopter.client.post(`/api/transfers/${offer.token}/accept`, { toPondId: home.id })).status).toBe(200)
    const note = (await entriesOfKind(friend.id, 'observation')).at(-1)!
    expect(note.data.text).toBe(`Separated from ${fish.name}: it went to a new owner on ${today()}.`)
    expect(note.pond_id).toBe(pond.id)
  })

  it('lets one of two acceptances at the same moment win', async () => {
    const { owner, fish } = await pondWithRoles()
    const [emailA, emailB] = [uniqueEmail('a'), uniqueEmail('b')]
    const offerA = await offerFish(owner.client, fish.id, emailA)
    const offerB = await offerFish(owner.client, fish.id, emailB)
    const [a, b] = [await signedInUser({ email: emailA }), await signedInUser({ email: emailB })]
    const [pondA, pondB] = [await createPond(a.client), await createPond(b.client)]
    const results = await Promise.all([
      a.client.post(`/api/transfers/${offerA.token}/accept`, { toPondId: pondA.id }),
      b.client.post(`/api/transfers/${offerB.token}/accept`, { toPondId: pondB.id }),
    ])
    expect(results.map(r => r.status).sort()).toEqual([200, 409])
    expect(results.find(r => r.status === 409)!.body.message).toMatch(/the fish has moved since/)
    expect([pondA.id, pondB.id]).toContain(await pondOf(fish.id))
    expect(await entriesOfKind(fish.id, 'move')).toHaveLength(1)
  })

  it('refuses withdrawn and expired offers (410), and offers overtaken by a move or a handover (409)', async () => {
    const { owner, pond, fish } = await pondWithRoles()
    const other = await createPond(owner.client)
    const taker = await signedInUser()
    const takerPond = await createPond(taker.client)
    const accept = (token: string) => taker.client.post(`/api/transfers/${token}/accept`, { toPondId: takerPond.id })

    const withdrawn = await offerFish(owner.client, fish.id, taker.email)
    expect((await owner.client.delete(`/api/fish/${fish.id}/transfers/${withdrawn.id}`)).status).toBe(200)
    expect((await accept(withdrawn.token)).status).toBe(410)

    const expired = await offerFish(owner.client, fish.id, taker.email)
    await testDb().query(`update fish_transfers set expires_at = now() - interval '1 second' where id = $1`, [expired.id])
    expect((await accept(expired.token)).status).toBe(410)

    const overtaken = await offerFish(owner.client, fish.id, taker.email)
    expect((await owner.client.post(`/api/fish/${fish.id}/move`, { toPondId: other.id })).status).toBe(200)
    const late = await accept(overtaken.token)
    expect(late.status).toBe(409)
    expect(late.body.message).toMatch(/the fish has moved since this offer was made/)

    const second = await createFish(owner.client, pond.id)
    const beforeHandover = await offerFish(owner.client, second.id, taker.email)
    const heirEmail = uniqueEmail('heir')
    const handover = await offerPond(owner.client, pond.id, heirEmail)
    const heir = await signedInUser({ email: heirEmail })
    expect((await heir.client.post(`/api/handovers/${handover.token}/accept`)).status).toBe(200)
    const afterHandover = await accept(beforeHandover.token)
    expect(afterHandover.status).toBe(409)
    expect(afterHandover.body.message).toMatch(/changed hands/)
    expect((await new ApiClient().get(`/api/transfers/${beforeHandover.token}`)).body).toMatchObject({ state: 'superseded', reason: expect.stringMatching(/changed hands/) })
    expect(await pondOf(second.id)).toBe(pond.id)
    expect(await entriesOfKind(second.id, 'move')).toEqual([])
  })

  it('answers each caller who may not offer, list, withdraw or accept with the exact status', async () => {
    const { owner, keeper, vet, outsider, anonymous, fish } = await pondWithRoles()
    const email = uniqueEmail('adopter')
    const offer = await offerFish(owner.client, fish.id, email)
    for (const [client, status] of [[keeper.client, 403], [vet.client, 403], [outsider.client, 404], [anonymous.client, 401]] as const) {
      expect((await client.post(`/api/fish/${fish.id}/transfers`, { email: uniqueEmail() })).status).toBe(status)
      expect((await client.get(`/api/fish/${fish.id}/transfers`)).status).toBe(status)
      expect((await client.delete(`/api/fish/${fish.id}/transfers/${offer.id}`)).status).toBe(status)
    }
    const otherPond = await createPond(outsider.client)
    expect((await outsider.client.post(`/api/transfers/${offer.token}/accept`, { toPondId: otherPond.id })).status).toBe(403)
    expect((await anonymous.client.post(`/api/transfers/${offer.token}/accept`, { newPondName: 'X' })).status).toBe(401)
    const adopter = await signedInUser({ email })
    expect((await adopter.client.post(`/api/transfers/${offer.token}/accept`, { toPondId: otherPond.id })).status).toBe(404)
    const keptOnly = await createPond(outsider.client)
    await addMember(keptOnly.id, adopter.user.id, 'keeper')
    expect((await adopter.client.post(`/api/transfers/${offer.token}/accept`, { toPondId: keptOnly.id })).status).toBe(403)
    const self = await owner.client.post(`/api/fish/${fish.id}/transfers`, { email: owner.email })
    expect(self.status).toBe(400)
    expect(self.body.data.fieldErrors.email[0]).toMatch(/use Move/)
    expect((await owner.client.get(`/api/fish/${fish.id}/transfers`)).body).toHaveLength(1)
  })
})

describe('before a move', () => {
  it('names the members of the old pond who are not in the new one, and checks access like the move', async () => {
    const owner = await signedInUser({ name: 'Owner' })
    const [keeper, vet, both] = await Promise.all([signedInUser({ name: 'Keeper' }), signedInUser({ name: 'Vet' }), signedInUser({ name: 'Both' })])
    const [from, to] = [await createPond(owner.client), await createPond(owner.client)]
    await addMember(from.id, keeper.user.id, 'keeper')
    await addMember(from.id, vet.user.id, 'vet')
    await addMember(from.id, both.user.id, 'vet')
    await addMember(to.id, both.user.id, 'keeper')
    const fish = await createFish(owner.client, from.id)
    const preview = await owner.client.get(`/api/fish/${fish.id}/move-preview?toPondId=${to.id}`)
    expect(preview.status, JSON.stringify(preview.body)).toBe(200)
    expect(preview.body).toEqual({
      toPond: { id: to.id, name: to.name },
      losingSight: [{ id: keeper.user.id, name: 'Keeper', role: 'keeper' }, { id: vet.user.id, name: 'Vet', role: 'vet' }],
      companions: [],
    })
    // Asking changes nothing.
    expect((await testDb().query('select pond_id from fish where id = $1', [fish.id])).rows[0].pond_id).toBe(from.id)
    expect((await keeper.client.get(`/api/fish/${fish.id}/move-preview?toPondId=${to.id}`)).status).toBe(403)
    const stranger = await signedInUser()
    expect((await stranger.client.get(`/api/fish/${fish.id}/move-preview?toPondId=${to.id}`)).status).toBe(404)
    const foreign = await createPond(stranger.client)
    expect((await owner.client.get(`/api/fish/${fish.id}/move-preview?toPondId=${foreign.id}`)).status).toBe(404)
    const same = await owner.client.get(`/api/fish/${fish.id}/move-preview?toPondId=${from.id}`)
    expect(same.status).toBe(400)
    expect(same.body.data.fieldErrors.toPondId).toEqual(['The fish already lives in this pond'])
    expect((await owner.client.get(`/api/fish/${fish.id}/move-preview?toPondId=nope`)).body.data.fieldErrors.toPondId).toEqual(['Choose one of your ponds'])
  })
})
