import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { waitForMail } from '../support/mail'
import { addMember, createFish, createPond, pondWithRoles, signedInUser, TEST_PASSWORD, uniqueEmail } from '../support/factories'
import { entriesOfKind, insertReadyPhoto, membershipOf, offerPond } from '../support/custody'

afterAll(closeTestDb)

const day = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10)

/** A pond with history written by each role, as a new owner should find it. */
async function pondWithHistory() {
  const roles = await pondWithRoles()
  const { owner, keeper, vet, fish } = roles
  const second = await createFish(owner.client, roles.pond.id, { name: 'Second koi' })
  const writes = [
    [keeper.client, fish.id, { kind: 'measurement', occurredAt: day(400), data: { weightG: 1800, lengthCm: 45, lengthType: 'total' } }],
    [owner.client, fish.id, { kind: 'observation', occurredAt: day(200), data: { signs: ['eating_well'], text: 'Took food from the hand' } }],
    [vet.client, second.id, { kind: 'exam', occurredAt: day(100), data: { reason: 'Spring health check', assessment: 'Healthy' } }],
  ] as const
  for (const [client, fishId, entry] of writes) expect((await client.post(`/api/fish/${fishId}/timeline`, entry)).status).toBe(201)
  const photoId = await insertReadyPhoto(fish.id, owner.user.id, `${day(50)}T09:30:00.000Z`)
  return { ...roles, second, photoId }
}

async function timelineOf(client: ApiClient, fishId: string) {
  const response = await client.get(`/api/fish/${fishId}/timeline?limit=200`)
  expect(response.status).toBe(200)
  return response.body.entries as { id: string, kind: string, occurredAt: string, author: { name: string } | null, data: Record<string, unknown> }[]
}

describe('handing a pond over to a new owner', () => {
  it('works end to end through the mailed link: nothing changes before acceptance, everything arrives after it', async () => {
    const { owner, keeper, vet, pond, fish, second, photoId } = await pondWithHistory()
    const before = await timelineOf(owner.client, fish.id)
    const newOwnerEmail = uniqueEmail('heir')
    const { token } = await offerPond(owner.client, pond.id, newOwnerEmail, 'stay')

    // The link tells anyone holding it what accepting does; until then the old owner still rules.
    const info = await new ApiClient().get(`/api/handovers/${token}`)
    expect(info.body).toMatchObject({ pondName: pond.name, fromName: 'Owner', email: newOwnerEmail, membersOption: 'stay', state: 'open', fishCount: 2 })
    expect((await owner.client.patch(`/api/ponds/${pond.id}`, { notes: 'Still mine' })).status).toBe(200)
    expect((await owner.client.get(`/api/ponds/${pond.id}/audit`)).status).toBe(200)

    // An account is made through the invitation-like link, with the address it was sent to.
    const heir = new ApiClient()
    expect((await heir.post(`/api/handovers/${token}/accept`)).status).toBe(401)
    expect((await heir.post('/api/auth/sign-up', { name: 'New Owner', email: newOwnerEmail, password: TEST_PASSWORD })).status).toBe(201)
    expect((await heir.get(`/api/ponds/${pond.id}`)).status).toBe(404)
    expect((await membershipOf(pond.id, owner.user.id))?.role).toBe('owner')

    const accepted = await heir.post(`/api/handovers/${token}/accept`)
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200)
    expect(accepted.body).toEqual({ pondId: pond.id, fishCount: 2 })

    expect((await heir.get(`/api/ponds/${pond.id}`)).body.role).toBe('owner')
    const fishList = (await heir.get(`/api/ponds/${pond.id}/fish`)).body as { id: string }[]
    expect(fishList.map(f => f.id).sort()).toEqual([fish.id, second.id].sort())
    // Every entry and photo is there with its original author and date; the handover is one entry more.
    const after = await timelineOf(heir, fish.id)
    const handover = after.filter(e => e.kind === 'owner_change')
    expect(handover).toHaveLength(1)
    expect(handover[0]).toMatchObject({ author: { name: 'New Owner' }, data: { from: 'Owner', to: 'New Owner', membersOption: 'stay' } })
    const history = after.filter(e => e.kind !== 'owner_change')
    expect(history.map(e => [e.id, e.kind, e.occurredAt, e.author?.name])).toEqual(before.map(e => [e.id, e.kind, e.occurredAt, e.author?.name]))
    expect(history.find(e => e.kind === 'photo')?.id).toBe(photoId)
    expect(history.find(e => e.kind === 'measurement')).toMatchObject({ author: { name: 'Keeper' }, occurredAt: `${day(400)}T12:00:00.000Z`, data: { weightG: 1800 } })
    const secondTimeline = await timelineOf(heir, second.id)
    expect(secondTimeline.find(e => e.kind === 'exam')).toMatchObject({ author: { name: 'Vet' }, occurredAt: `${day(100)}T12:00:00.000Z` })
    expect(secondTimeline.filter(e => e.kind === 'owner_change')).toHaveLength(1)
    for (const id of [fish.id, second.id]) expect((await entriesOfKind(id, 'owner_change'))[0]!.revisions).toBe(1)

    // "Stay": keeper and vet keep their roles; the previous owner stays on as a keeper.
    expect(await membershipOf(pond.id, keeper.user.id)).toEqual({ role: 'keeper', read_only: false })
    expect(await membershipOf(pond.id, vet.user.id)).toEqual({ role: 'vet', read_only: false })
    expect(await membershipOf(pond.id, owner.user.id)).toEqual({ role: 'keeper', read_only: false })
    expect((await owner.client.patch(`/api/ponds/${pond.id}`, { notes: 'Not mine any more' })).status).toBe(403)
    expect((await owner.client.post(`/api/ponds/${pond.id}/handovers`, { email: uniqueEmail(), membersOption: 'stay' })).status).toBe(403)
    expect((await keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'measurement', occurredAt: day(1), data: { weightG: 1850 } })).status).toBe(201)

    // The pond's record: the audit log names both people, and the previous owner is told by mail.
    const audit = (await heir.get(`/api/ponds/${pond.id}/audit`)).body.events as { action: string, details: Record<string, unknown> }[]
    expect(audit[0]).toMatchObject({ action: 'handover.accepted', details: { fromName: 'Owner', toName: 'New Owner', membersOption: 'stay', fishCount: 2 } })
    expect(audit.map(e => e.action)).toContain('handover.offered')
    await waitForMail(owner.email, m => m.subject.includes('accepted the pond'))
    expect((await new ApiClient().get(`/api/handovers/${token}`)).body.state).toBe('accepted')
    expect((await heir.post(`/api/handovers/${token}/accept`)).status).toBe(409)
  })

  it('with "read-only", the old members may read everything and write nothing, until an owner allows changes', async () => {
    const { owner, keeper, vet, pond, fish } = await pondWithHistory()
    const keeperEntry = (await timelineOf(keeper.client, fish.id)).find(e => e.kind === 'measurement')!
    const heirEmail = uniqueEmail('heir')
    const { token } = await offerPond(owner.client, pond.id, heirEmail, 'read_only')
    const heir = await signedInUser({ name: 'Heir', email: heirEmail })
    expect((await heir.client.post(`/api/handovers/${token}/accept`)).status).toBe(200)

    expect(await membershipOf(pond.id, owner.user.id)).toEqual({ role: 'keeper', read_only: true })
    expect(await membershipOf(pond.id, keeper.user.id)).toEqual({ role: 'keeper', read_only: true })
    expect(await membershipOf(pond.id, vet.user.id)).toEqual({ role: 'vet', read_only: true })
    for (const person of [owner, keeper, vet]) {
      const profile = await person.client.get(`/api/fish/${fish.id}`)
      expect(profile.status).toBe(200)
      // The client is told, so it offers no button the server would refuse.
      expect(profile.body.readOnly).toBe(true)
      expect((await person.client.get(`/api/ponds/${pond.id}`)).body.readOnly).toBe(true)
      const gallery = (await person.client.get(`/api/fish/${fish.id}/photos`)).body
      expect(gallery).toMatchObject({ canUpload: false, canSetProfile: false })
      expect((await person.client.get(`/api/fish/${fish.id}/timeline`)).status).toBe(200)
      const write = await person.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'observation', occurredAt: day(1), data: { text: 'Still here' } })
      expect(write.status).toBe(403)
      expect(write.body.message).toMatch(/read-only/)
    }
    expect((await keeper.client.post(`/api/ponds/${pond.id}/fish`, { name: 'New fish', species: 'koi' })).status).toBe(403)
    expect((await keeper.client.patch(`/api/fish/${fish.id}`, { version: 1, variety: 'Sanke' })).status).toBe(403)
    // Even their own entry: amending and "entered in error" are writes.
    const amend = await keeper.client.post(`/api/timeline/${keeperEntry.id}/amend`, { revision: 1, data: { weightG: 1790, lengthCm: 45, lengthType: 'total' }, reason: 'Scale was off' })
    expect(amend.status).toBe(403)
    expect((await keeper.client.post(`/api/timeline/${keeperEntry.id}/entered-in-error`, { reason: 'Wrong fish' })).status).toBe(403)
    expect((await keeper.client.get(`/api/timeline/${keeperEntry.id}/revisions`)).status).toBe(200)

    const members = (await heir.client.get(`/api/ponds/${pond.id}/members`)).body as { userId: string, readOnly: boolean }[]
    expect(members.find(m => m.userId === keeper.user.id)?.readOnly).toBe(true)
    expect((await keeper.client.patch(`/api/ponds/${pond.id}/members/${keeper.user.id}/read-only`, { readOnly: false })).status).toBe(403)
    expect((await heir.client.patch(`/api/ponds/${pond.id}/members/${keeper.user.id}/read-only`, { readOnly: false })).status).toBe(200)
    expect((await keeper.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'observation', occurredAt: day(1), data: { text: 'Back at work' } })).status).toBe(201)
    expect((await owner.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'observation', occurredAt: day(1), data: { text: 'Me too?' } })).status).toBe(403)
  })

  it('replacing a keeper: the new keeper sees the history from the first day, the old one nothing', async () => {
    const { owner, keeper, pond, fish } = await pondWithHistory()
    const firstDay = (await timelineOf(owner.client, fish.id)).map(e => e.id)
    expect((await owner.client.delete(`/api/ponds/${pond.id}/members/${keeper.user.id}`)).status).toBe(200)
    const next = await signedInUser({ name: 'Next Keeper' })
    await addMember(pond.id, next.user.id, 'keeper')
    expect((await keeper.client.get(`/api/fish/${fish.id}`)).status).toBe(404)
    expect((await timelineOf(next.client, fish.id)).map(e => e.id)).toEqual(firstDay)
    // A read-only member made owner is an ordinary owner again: owners are never read-only.
    await testDb().query('update memberships set read_only = true where pond_id = $1 and user_id = $2', [pond.id, next.user.id])
    expect((await owner.client.patch(`/api/ponds/${pond.id}/members/${next.user.id}`, { role: 'owner' })).status).toBe(200)
    expect(await membershipOf(pond.id, next.user.id)).toEqual({ role: 'owner', read_only: false })
    expect((await owner.client.patch(`/api/ponds/${pond.id}/members/${next.user.id}/read-only`, { readOnly: true })).status).toBe(409)
  })

  it('with "leave", every old member loses the pond at once', async () => {
    const { owner, keeper, vet, pond, fish } = await pondWithHistory()
    const heirEmail = uniqueEmail('heir')
    const { token } = await offerPond(owner.client, pond.id, heirEmail, 'leave')
    const heir = await signedInUser({ email: heirEmail })
    expect((await heir.client.post(`/api/handovers/${token}/accept`)).status).toBe(200)
    for (const person of [owner, keeper, vet]) {
      expect((await person.client.get(`/api/ponds/${pond.id}`)).status).toBe(404)
      expect((await person.client.get(`/api/fish/${fish.id}`)).status).toBe(404)
    }
    const { rows } = await testDb().query('select user_id, role from memberships where pond_id = $1', [pond.id])
    expect(rows).toEqual([{ user_id: heir.user.id, role: 'owner' }])
  })

  it('lets exactly one of two handovers accepted at the same moment win; the other is told why', async () => {
    const owner = await signedInUser({ name: 'Owner' })
    const pond = await createPond(owner.client)
    const fish = await createFish(owner.client, pond.id)
    const [emailA, emailB] = [uniqueEmail('a'), uniqueEmail('b')]
    const offerA = await offerPond(owner.client, pond.id, emailA, 'stay')
    const offerB = await offerPond(owner.client, pond.id, emailB, 'leave')
    const [a, b] = [await signedInUser({ email: emailA }), await signedInUser({ email: emailB })]

    const results = await Promise.all([a.client.post(`/api/handovers/${offerA.token}/accept`), b.client.post(`/api/handovers/${offerB.token}/accept`)])
    expect(results.map(r => r.status).sort()).toEqual([200, 409])
    const loser = results.find(r => r.status === 409)!
    expect(loser.body.message).toMatch(/another offer was accepted first/)
    const winner = results[0]!.status === 200 ? a : b
    const { rows } = await testDb().query(`select user_id from memberships where pond_id = $1 and role = 'owner'`, [pond.id])
    expect(rows).toEqual([{ user_id: winner.user.id }])
    expect(await entriesOfKind(fish.id, 'owner_change')).toHaveLength(1)
    const loserToken = results[0]!.status === 200 ? offerB.token : offerA.token
    expect((await new ApiClient().get(`/api/handovers/${loserToken}`)).body.state).toBe('superseded')

    // The same link sent twice at once (a double tap): one acceptance, one 409.
    const heirEmail = uniqueEmail('double')
    const again = await offerPond(winner.client, pond.id, heirEmail, 'stay')
    const heir = await signedInUser({ email: heirEmail })
    const twice = await Promise.all([heir.client.post(`/api/handovers/${again.token}/accept`), heir.client.post(`/api/handovers/${again.token}/accept`)])
    expect(twice.map(r => r.status).sort()).toEqual([200, 409])
    expect(await entriesOfKind(fish.id, 'owner_change')).toHaveLength(2)
  })

  it('refuses a withdrawn or expired offer (410) and changes nothing', async () => {
    const { owner, pond, fish } = await pondWithRoles()
    const withdrawnEmail = uniqueEmail('withdrawn')
    const withdrawn = await offerPond(owner.client, pond.id, withdrawnEmail)
    expect((await owner.client.get(`/api/ponds/${pond.id}/handovers`)).body.map((o: { id: string }) => o.id)).toEqual([withdrawn.id])
    expect((await owner.client.delete(`/api/ponds/${pond.id}/handovers/${withdrawn.id}`)).status).toBe(200)
    expect((await owner.client.delete(`/api/ponds/${pond.id}/handovers/${withdrawn.id}`)).status).toBe(404)
    expect((await owner.client.get(`/api/ponds/${pond.id}/handovers`)).body).toEqual([])
    const late = await signedInUser({ email: withdrawnEmail })
    const refused = await late.client.post(`/api/handovers/${withdrawn.token}/accept`)
    expect(refused.status).toBe(410)
    expect(refused.body.message).toMatch(/withdrawn/)

    const expiredEmail = uniqueEmail('expired')
    const expired = await offerPond(owner.client, pond.id, expiredEmail)
    await testDb().query(`update pond_handovers set expires_at = now() - interval '1 minute' where id = $1`, [expired.id])
    expect((await new ApiClient().get(`/api/handovers/${expired.token}`)).body.state).toBe('expired')
    const tooLate = await signedInUser({ email: expiredEmail })
    expect((await tooLate.client.post(`/api/handovers/${expired.token}/accept`)).status).toBe(410)

    expect((await membershipOf(pond.id, owner.user.id))?.role).toBe('owner')
    expect(await membershipOf(pond.id, late.user.id)).toBeUndefined()
    expect(await entriesOfKind(fish.id, 'owner_change')).toEqual([])
    const audit = (await owner.client.get(`/api/ponds/${pond.id}/audit`)).body.events.map((e: { action: string }) => e.action)
    expect(audit).toEqual(['handover.offered', 'handover.withdrawn', 'handover.offered'])
  })

  it('answers a non-owner with exact status codes for each action', async () => {
    const { owner, keeper, vet, outsider, anonymous, pond } = await pondWithRoles()
    const body = { email: uniqueEmail('target'), membersOption: 'stay' }
    const offer = await offerPond(owner.client, pond.id, body.email)
    const cases: [ApiClient, number][] = [[keeper.client, 403], [vet.client, 403], [outsider.client, 404], [anonymous.client, 401]]
    for (const [client, status] of cases) {
      expect((await client.post(`/api/ponds/${pond.id}/handovers`, body)).status).toBe(status)
      expect((await client.get(`/api/ponds/${pond.id}/handovers`)).status).toBe(status)
      expect((await client.delete(`/api/ponds/${pond.id}/handovers/${offer.id}`)).status).toBe(status)
    }
    // Accepting: only the addressee, signed in; the keeper holding a forwarded link is refused.
    expect((await keeper.client.post(`/api/handovers/${offer.token}/accept`)).status).toBe(403)
    expect((await anonymous.client.post(`/api/handovers/${offer.token}/accept`)).status).toBe(401)
    expect((await outsider.client.post('/api/handovers/not-a-real-token/accept')).status).toBe(404)
    expect((await anonymous.client.get('/api/handovers/not-a-real-token')).status).toBe(404)
    expect((await membershipOf(pond.id, keeper.user.id))?.role).toBe('keeper')
    expect((await owner.client.get(`/api/ponds/${pond.id}/handovers`)).body).toHaveLength(1)
  })

  it('checks what an offer says: a valid address, a known option, not an existing owner', async () => {
    const { owner, pond } = await pondWithRoles()
    const bad = await owner.client.post(`/api/ponds/${pond.id}/handovers`, { email: 'not an address', membersOption: 'vanish' })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['email', 'membersOption'])
    const self = await owner.client.post(`/api/ponds/${pond.id}/handovers`, { email: owner.email.toUpperCase(), membersOption: 'stay' })
    expect(self.status).toBe(400)
    expect(self.body.data.fieldErrors.email[0]).toMatch(/already own/)
  })

  it('lapses when the person who offered is no longer an owner by the time it is accepted', async () => {
    const owner = await signedInUser({ name: 'First owner' })
    const coOwner = await signedInUser({ name: 'Co-owner' })
    const pond = await createPond(owner.client)
    await addMember(pond.id, coOwner.user.id, 'owner')
    const heirEmail = uniqueEmail('heir')
    const { token } = await offerPond(owner.client, pond.id, heirEmail)
    const invitation = await owner.client.post(`/api/ponds/${pond.id}/invitations`, { email: uniqueEmail('invited'), role: 'keeper' })
    expect(invitation.status).toBe(201)
    expect((await coOwner.client.patch(`/api/ponds/${pond.id}/members/${owner.user.id}`, { role: 'keeper' })).status).toBe(200)
    const heir = await signedInUser({ email: heirEmail })
    const refused = await heir.client.post(`/api/handovers/${token}/accept`)
    expect(refused.status).toBe(409)
    expect(refused.body.message).toMatch(/no longer one of its owners/)
    expect(await membershipOf(pond.id, heir.user.id)).toBeUndefined()

    // Offered again by the remaining owner, it goes through and closes the old owner's open invitation with it.
    const second = await offerPond(coOwner.client, pond.id, heirEmail)
    expect((await heir.client.post(`/api/handovers/${second.token}/accept`)).status).toBe(200)
    expect((await coOwner.client.get(`/api/ponds/${pond.id}/invitations`)).status).toBe(403)
    expect((await heir.client.get(`/api/ponds/${pond.id}/invitations`)).body).toEqual([])
  })
})

describe('the words of a handover offer', () => {
  it.each([
    { option: 'stay', says: /What happens when you accept: The keepers and vets of the pond keep their roles, and Owner \(with any other owner\) stays on as a keeper/ },
    { option: 'read_only', says: /What happens when you accept: Everyone now in the pond, Owner included, can still see its whole history but can change nothing/ },
    { option: 'leave', says: /What happens when you accept: Everyone now in the pond, Owner included, loses access when you accept/ },
  ] as const)('tells the recipient what happens to them and when the offer expires ($option)', async ({ option, says }) => {
    const { owner, pond } = await pondWithRoles()
    const email = uniqueEmail('recipient')
    const response = await owner.client.post(`/api/ponds/${pond.id}/handovers`, { email, membersOption: option }, { 'accept-language': 'en-GB' })
    expect(response.status).toBe(201)
    const mail = await waitForMail(email, m => m.subject.includes('offers you the pond'))
    const text = mail.text.replace(/\s+/g, ' ')
    expect(text).toMatch(says)
    // The sender's own words ("you and any other owner", "you included") are not sent to the recipient.
    expect(text).not.toMatch(/you and any other owner|you included/)
    const expires = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(new Date(response.body.expiresAt))
    expect(text).toContain(`the offer expires on ${expires} (in 14 days)`)
  })
})
