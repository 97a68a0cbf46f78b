import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { simpleParser } from 'mailparser'
import { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT } from '../support/env'
import { createFish, createPond, pondWithRoles, signedInUser, TEST_PASSWORD, uniqueEmail } from '../support/factories'
import { linkIn, startCapturingSmtp, waitForMail, waitUntil } from '../support/mail'
import { startServer, type RunningServer } from '../support/server'

afterAll(closeTestDb)

const pendingInvitations = (client: ApiClient, pondId: string) => client.get(`/api/ponds/${pondId}/invitations`).then(r => r.body as { id: string, email: string, mail: { status: string, attempts: number } | null }[])

describe('mail outbox (mail service up)', () => {
  it('queues the invitation with its mail, shows it sent, and resends with a fresh link that replaces the old one', async () => {
    const { owner, keeper, outsider, pond } = await pondWithRoles()
    const email = uniqueEmail('outbox')
    const created = await owner.client.post(`/api/ponds/${pond.id}/invitations`, { email, role: 'keeper' })
    expect(created.status).toBe(201)
    const first = await waitForMail(email, m => m.subject.includes('invites you'))
    const sent = await waitUntil(() => pendingInvitations(owner.client, pond.id), list => list[0]?.mail?.status === 'sent', 45_000)
    expect(sent[0]).toMatchObject({ email, mail: { status: 'sent', attempts: 1 } })

    // Only an owner may resend; a non-member does not see the invitation at all.
    expect((await keeper.client.post(`/api/ponds/${pond.id}/invitations/${sent[0]!.id}/resend`)).status).toBe(403)
    expect((await outsider.client.post(`/api/ponds/${pond.id}/invitations/${sent[0]!.id}/resend`)).status).toBe(404)
    expect((await owner.client.post(`/api/ponds/${pond.id}/invitations/00000000-0000-4000-8000-000000000000/resend`)).status).toBe(404)

    expect((await owner.client.post(`/api/ponds/${pond.id}/invitations/${sent[0]!.id}/resend`)).status).toBe(202)
    const second = await waitForMail(email, m => m.subject.includes('invites you') && m.id !== first.id)
    const oldToken = new URL(linkIn(first, '/invitations/')).pathname.split('/').pop()!
    const newToken = new URL(linkIn(second, '/invitations/')).pathname.split('/').pop()!
    expect(newToken).not.toBe(oldToken)
    expect((await new ApiClient().get(`/api/invitations/${oldToken}`)).status).toBe(404)
    expect((await new ApiClient().get(`/api/invitations/${newToken}`)).body).toMatchObject({ state: 'open', email })
  })

  it('keeps one outbox row per mail, in the same transaction as the offer', async () => {
    const owner = await signedInUser()
    const pond = await createPond(owner.client)
    const email = uniqueEmail('together')
    const created = await owner.client.post(`/api/ponds/${pond.id}/handovers`, { email, membersOption: 'stay' })
    expect(created.status).toBe(201)
    const { rows } = await testDb().query(`select kind, subject_type, "to" from outgoing_mail where subject_id = $1`, [created.body.id])
    expect(rows).toEqual([{ kind: 'handover', subject_type: 'handover', to: email }])
  })
})

describe('mail outbox (mail service down)', () => {
  // A server with a job schema of its own, so only its worker (pointed at a dead SMTP port) sends its jobs.
  const port = MAIN_PORT + 1
  const smtpPort = MAIN_PORT + 2
  const serverEnv = { NUXT_JOBS_SCHEMA: 'pgboss_outbox_test', NUXT_SMTP_PORT: String(smtpPort), NUXT_MAIL_RETRY_LIMIT: '1', NUXT_MAIL_RETRY_DELAY_SECONDS: '1', NUXT_APP_ORIGIN: `http://127.0.0.1:${port}` }
  let server: RunningServer

  beforeAll(async () => {
    server = await startServer(port, serverEnv)
  })
  afterAll(async () => {
    await server?.stop()
  })

  // Generous waits: on a loaded machine each attempt can take seconds.
  it('answers every offer 201 while mail is down, marks the mail failed after its retries, and resend delivers it later', { timeout: 120_000 }, async () => {
    const owner = await signedInUser({}, {})
    const client = new ApiClient(server.url)
    expect((await client.post('/api/auth/sign-in', { email: owner.email, password: TEST_PASSWORD })).status).toBe(200)
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)

    const inviteeEmail = uniqueEmail('down-invite')
    expect((await client.post(`/api/ponds/${pond.id}/invitations`, { email: inviteeEmail, role: 'vet' })).status).toBe(201)
    expect((await client.post(`/api/ponds/${pond.id}/handovers`, { email: uniqueEmail('down-heir'), membersOption: 'stay' })).status).toBe(201)
    expect((await client.post(`/api/fish/${fish.id}/transfers`, { email: uniqueEmail('down-rehome') })).status).toBe(201)

    // Two attempts (retry limit 1), then failed; the offers themselves stay open.
    const failed = await waitUntil(() => pendingInvitations(client, pond.id), list => list[0]?.mail?.status === 'failed', 45_000)
    expect(failed[0]!.mail).toMatchObject({ status: 'failed', attempts: 2 })
    const handovers = await waitUntil(() => client.get(`/api/ponds/${pond.id}/handovers`).then(r => r.body), list => list[0]?.mail?.status === 'failed', 45_000)
    expect(handovers).toHaveLength(1)
    const transfers = await waitUntil(() => client.get(`/api/fish/${fish.id}/transfers`).then(r => r.body), list => list[0]?.mail?.status === 'failed', 45_000)
    expect(transfers).toHaveLength(1)

    // The mail service comes back: resend goes out, with a link that works.
    const smtp = await startCapturingSmtp(smtpPort)
    try {
      expect((await client.post(`/api/ponds/${pond.id}/invitations/${failed[0]!.id}/resend`)).status).toBe(202)
      expect((await client.post(`/api/ponds/${pond.id}/handovers/${handovers[0].id}/resend`)).status).toBe(202)
      expect((await client.post(`/api/fish/${fish.id}/transfers/${transfers[0].id}/resend`)).status).toBe(202)
      await waitUntil(() => pendingInvitations(client, pond.id), list => list[0]?.mail?.status === 'sent', 45_000)
      await waitUntil(() => client.get(`/api/ponds/${pond.id}/handovers`).then(r => r.body), list => list[0]?.mail?.status === 'sent', 45_000)
      await waitUntil(() => client.get(`/api/fish/${fish.id}/transfers`).then(r => r.body), list => list[0]?.mail?.status === 'sent', 45_000)
      const delivered = smtp.received.find(m => m.to.includes(inviteeEmail))
      expect(delivered).toBeDefined()
      const parsed = await simpleParser(delivered!.raw)
      const token = parsed.text!.match(/\/invitations\/(\S+)/)![1]
      expect((await new ApiClient().get(`/api/invitations/${token}`)).body).toMatchObject({ state: 'open', email: inviteeEmail })
    }
    finally {
      await smtp.close()
    }
  })

  it('answers a reset request alike for an account and an unknown address, with mail down', async () => {
    const person = await signedInUser()
    const client = new ApiClient(server.url)
    const nobody = uniqueEmail('nobody')
    const known = await client.post('/api/auth/reset-request', { email: person.email })
    const unknown = await client.post('/api/auth/reset-request', { email: nobody })
    expect(known.status).toBe(200)
    expect(unknown.status).toBe(200)
    expect(unknown.body).toEqual(known.body)
    // Both did the same work: one mail each in the outbox, nothing sent on the request path.
    const { rows } = await testDb().query(`select "to", kind from outgoing_mail where "to" in ($1, $2) order by kind`, [person.email, nobody])
    expect(rows).toEqual([
      { to: person.email, kind: 'password-reset' },
      { to: nobody, kind: 'password-reset-no-account' },
    ])
  })

  it('loses no queued mail when the server is killed: after a restart the mail goes out', { timeout: 120_000 }, async () => {
    const owner = await signedInUser()
    const client = new ApiClient(server.url)
    expect((await client.post('/api/auth/sign-in', { email: owner.email, password: TEST_PASSWORD })).status).toBe(200)
    const pond = await createPond(client)
    const email = uniqueEmail('survivor')
    await server.stop()
    server = await startServer(port, { ...serverEnv, NUXT_MAIL_RETRY_LIMIT: '5', NUXT_MAIL_RETRY_DELAY_SECONDS: '1' })
    expect((await client.post(`/api/ponds/${pond.id}/invitations`, { email, role: 'keeper' })).status).toBe(201)
    await server.kill()
    const smtp = await startCapturingSmtp(smtpPort)
    try {
      server = await startServer(port, serverEnv)
      await waitUntil(async () => smtp.received.some(m => m.to.includes(email)), found => found, 45_000)
      const [row] = await waitUntil(() => testDb().query(`select status from outgoing_mail where "to" = $1`, [email]).then(r => r.rows), rows => rows[0]?.status === 'sent', 45_000)
      expect(row.status).toBe('sent')
    }
    finally {
      await smtp.close()
    }
  })
})
