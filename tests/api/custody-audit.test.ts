import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { linkIn, waitForMail } from '../support/mail'
import { pondWithRoles, signedInUser, uniqueEmail } from '../support/factories'

afterAll(closeTestDb)

// 203.0.113.0/24 is TEST-NET-3 (RFC 5737), an address range reserved for documentation and tests.
const FROM = { 'x-forwarded-for': '203.0.113.7', 'user-agent': 'Fintrail audit test/1.0' }

async function auditOf(client: ApiClient, pondId: string, query = '') {
  const response = await client.get(`/api/ponds/${pondId}/audit${query}`)
  expect(response.status, JSON.stringify(response.body)).toBe(200)
  return response.body as { events: { action: string, actor: { name: string }, subject: { name: string } | null, summary: string, ip: string, userAgent: string, details: Record<string, unknown> }[], nextCursor: string | null }
}

describe('the audit log of a pond', () => {
  it('records invitations, role changes and removals with who, when and from where, newest first', async () => {
    const { owner, keeper, pond } = await pondWithRoles()
    const ownerHere = new ApiClient(undefined, FROM)
    ownerHere.cookies = new Map(owner.client.cookies)

    const inviteeEmail = uniqueEmail('audited')
    expect((await ownerHere.post(`/api/ponds/${pond.id}/invitations`, { email: inviteeEmail, role: 'vet' })).status).toBe(201)
    const token = new URL(linkIn(await waitForMail(inviteeEmail), '/invitations/')).pathname.split('/').pop()!
    const withdrawnEmail = uniqueEmail('withdrawn')
    const sent = await ownerHere.post(`/api/ponds/${pond.id}/invitations`, { email: withdrawnEmail, role: 'keeper' })
    expect((await ownerHere.delete(`/api/ponds/${pond.id}/invitations/${sent.body.id}`)).status).toBe(200)
    const invitee = await signedInUser({ name: 'Invited Vet', email: inviteeEmail })
    expect((await invitee.client.post(`/api/invitations/${token}/accept`)).status).toBe(200)
    expect((await ownerHere.patch(`/api/ponds/${pond.id}/members/${keeper.user.id}`, { role: 'vet' })).status).toBe(200)
    expect((await ownerHere.delete(`/api/ponds/${pond.id}/members/${keeper.user.id}`)).status).toBe(200)

    const { events } = await auditOf(owner.client, pond.id)
    expect(events.map(e => e.action)).toEqual(['member.removed', 'member.role_changed', 'invitation.accepted', 'invitation.withdrawn', 'invitation.sent', 'invitation.sent'])
    const [removed, changed, accepted, withdrawn, sentLast, sentFirst] = events
    expect(removed).toMatchObject({ actor: { name: 'Owner' }, subject: { name: 'Keeper' }, ip: '203.0.113.7', userAgent: 'Fintrail audit test/1.0', details: { role: 'vet' } })
    expect(changed).toMatchObject({ subject: { name: 'Keeper' }, details: { from: 'keeper', to: 'vet' }, summary: 'Keeper: keeper → vet' })
    expect(accepted).toMatchObject({ actor: { name: 'Invited Vet' }, details: { email: inviteeEmail, role: 'vet' } })
    expect(withdrawn!.details.email).toBe(withdrawnEmail)
    expect(sentLast!.details.email).toBe(withdrawnEmail)
    expect(sentFirst).toMatchObject({ details: { email: inviteeEmail, role: 'vet' }, summary: `${inviteeEmail} as vet` })
  })

  it('pages through older lines without skipping or repeating one', async () => {
    const { owner, pond } = await pondWithRoles()
    for (let i = 0; i < 5; i++) await owner.client.post(`/api/ponds/${pond.id}/invitations`, { email: uniqueEmail(`page${i}`), role: 'keeper' })
    const first = await auditOf(owner.client, pond.id, '?limit=2')
    expect(first.events).toHaveLength(2)
    const second = await auditOf(owner.client, pond.id, `?limit=2&before=${encodeURIComponent(first.nextCursor!)}`)
    const third = await auditOf(owner.client, pond.id, `?limit=2&before=${encodeURIComponent(second.nextCursor!)}`)
    expect(third.nextCursor).toBeNull()
    const emails = [...first.events, ...second.events, ...third.events].map(e => e.details.email)
    expect(new Set(emails).size).toBe(5)
    expect((await owner.client.get(`/api/ponds/${pond.id}/audit?before=nonsense`)).status).toBe(400)
  })

  it('is for owners only: keeper and vet 403, outsider 404, signed out 401', async () => {
    const { owner, keeper, vet, outsider, anonymous, pond } = await pondWithRoles()
    expect((await owner.client.get(`/api/ponds/${pond.id}/audit`)).status).toBe(200)
    expect((await keeper.client.get(`/api/ponds/${pond.id}/audit`)).status).toBe(403)
    expect((await vet.client.get(`/api/ponds/${pond.id}/audit`)).status).toBe(403)
    expect((await outsider.client.get(`/api/ponds/${pond.id}/audit`)).status).toBe(404)
    expect((await anonymous.client.get(`/api/ponds/${pond.id}/audit`)).status).toBe(401)
  })

  it('cannot be changed or deleted, even straight in the database', async () => {
    const { owner, pond } = await pondWithRoles()
    await owner.client.post(`/api/ponds/${pond.id}/invitations`, { email: uniqueEmail('kept'), role: 'keeper' })
    await expect(testDb().query(`update audit_events set action = 'x' where pond_id = $1`, [pond.id])).rejects.toThrow(/append-only/)
    await expect(testDb().query('delete from audit_events where pond_id = $1', [pond.id])).rejects.toThrow(/append-only/)
    const { rows } = await testDb().query('select count(*)::int as n from audit_events where pond_id = $1', [pond.id])
    expect(rows[0].n).toBe(1)
  })
})
