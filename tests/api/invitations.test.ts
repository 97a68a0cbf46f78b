import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { linkIn, receivedAfter, waitForMail } from '../support/mail'
import { createFish, createPond, signedInUser, TEST_PASSWORD, uniqueEmail } from '../support/factories'

afterAll(closeTestDb)

async function invite(owner: ApiClient, pondId: string, email: string, role: 'keeper' | 'vet' | 'owner') {
  const since = new Date()
  const response = await owner.post(`/api/ponds/${pondId}/invitations`, { email, role })
  expect(response.status).toBe(201)
  const mail = await waitForMail(email, receivedAfter(since, m => m.subject.includes('invites you')))
  return new URL(linkIn(mail, '/invitations/')).pathname.split('/').pop()!
}

describe('invitations by e-mail', () => {
  it('lets a new person sign up through the mailed link and join with the invited role', async () => {
    const owner = await signedInUser({ name: 'Inviting Owner' })
    const pond = await createPond(owner.client, { name: 'Lily pond' })
    const fish = await createFish(owner.client, pond.id)
    const email = uniqueEmail('newkeeper')
    const token = await invite(owner.client, pond.id, email, 'keeper')

    const info = await new ApiClient().get(`/api/invitations/${token}`)
    expect(info.body).toMatchObject({ pondName: 'Lily pond', invitedBy: 'Inviting Owner', role: 'keeper', state: 'open', email })

    const invitee = new ApiClient()
    expect((await invitee.post(`/api/invitations/${token}/accept`)).status).toBe(401)
    await invitee.post('/api/auth/sign-up', { name: 'New Keeper', email, password: TEST_PASSWORD })
    expect((await invitee.get(`/api/fish/${fish.id}`)).status).toBe(404)
    const accepted = await invitee.post(`/api/invitations/${token}/accept`)
    expect(accepted.status).toBe(200)
    expect(accepted.body).toEqual({ pondId: pond.id, role: 'keeper' })
    expect((await invitee.get(`/api/fish/${fish.id}`)).status).toBe(200)
    const ponds = (await invitee.get('/api/ponds')).body
    expect(ponds).toEqual([expect.objectContaining({ id: pond.id, role: 'keeper' })])
    expect((await invitee.post(`/api/invitations/${token}/accept`)).status).toBe(410)
  })

  it('refuses the link when opened by someone signed in with another address', async () => {
    const owner = await signedInUser()
    const pond = await createPond(owner.client)
    const token = await invite(owner.client, pond.id, uniqueEmail('intended'), 'vet')
    const stranger = await signedInUser()
    expect((await stranger.client.post(`/api/invitations/${token}/accept`)).status).toBe(403)
    const { rows } = await testDb().query('select count(*)::int as n from memberships where pond_id = $1', [pond.id])
    expect(rows[0].n).toBe(1)
  })

  it('refuses a withdrawn or expired invitation', async () => {
    const owner = await signedInUser()
    const pond = await createPond(owner.client)
    const withdrawnEmail = uniqueEmail('withdrawn')
    const withdrawnToken = await invite(owner.client, pond.id, withdrawnEmail, 'keeper')
    const pending = (await owner.client.get(`/api/ponds/${pond.id}/invitations`)).body
    expect((await owner.client.delete(`/api/ponds/${pond.id}/invitations/${pending[0].id}`)).status).toBe(200)
    const withdrawnUser = await signedInUser({ email: withdrawnEmail })
    expect((await withdrawnUser.client.post(`/api/invitations/${withdrawnToken}/accept`)).status).toBe(410)

    const expiredEmail = uniqueEmail('expired')
    const expiredToken = await invite(owner.client, pond.id, expiredEmail, 'keeper')
    await testDb().query(`update invitations set expires_at = now() - interval '1 minute' where email = $1`, [expiredEmail])
    const expiredUser = await signedInUser({ email: expiredEmail })
    expect((await expiredUser.client.post(`/api/invitations/${expiredToken}/accept`)).status).toBe(410)
    expect((await new ApiClient().get(`/api/invitations/${expiredToken}`)).body.state).toBe('expired')
    expect((await new ApiClient().get('/api/invitations/made-up-token')).status).toBe(404)
  })

  it('refuses a bad invitation body', async () => {
    const owner = await signedInUser()
    const pond = await createPond(owner.client)
    const response = await owner.client.post(`/api/ponds/${pond.id}/invitations`, { email: 'nope', role: 'admin' })
    expect(response.status).toBe(400)
    expect(Object.keys(response.body.data.fieldErrors).sort()).toEqual(['email', 'role'])
  })
})
