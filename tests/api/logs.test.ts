import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb } from '../support/db'
import { MAIN_PORT } from '../support/env'
import { uniqueEmail } from '../support/factories'
import { linkIn, receivedAfter, waitForMail } from '../support/mail'
import { startServer, type RunningServer } from '../support/server'

// The server's own output, read as an operator's log collector would: one JSON object per line.
let server: RunningServer

beforeAll(async () => {
  server = await startServer(MAIN_PORT + 12)
})

afterAll(async () => {
  await server?.stop()
  await closeTestDb()
})

function logLines() {
  return server.output().split('\n').filter(line => line.trim()).map((line) => {
    try {
      return JSON.parse(line) as Record<string, unknown>
    }
    catch {
      throw new Error(`not a JSON log line: ${line}`)
    }
  })
}

async function waitForLine(match: (line: Record<string, unknown>) => boolean) {
  for (let i = 0; i < 50; i++) {
    const found = logLines().find(match)
    if (found) return found
    await new Promise(r => setTimeout(r, 100))
  }
  throw new Error('log line not written')
}

describe('structured logs', () => {
  it('writes JSON lines with the request id that the response names, and never a secret', async () => {
    const client = new ApiClient(server.url)
    const email = uniqueEmail('logged')
    const password = 'marsh-marigold-by-the-inlet'
    const signUp = await client.post('/api/auth/sign-up', { name: 'Logged Person', email, password })
    expect(signUp.status).toBe(201)
    const requestId = signUp.headers.get('x-request-id')
    expect(requestId).toMatch(/^[0-9a-f-]{36}$/)
    const line = await waitForLine(l => l.requestId === requestId && l.path === '/api/auth/sign-up')
    expect(line).toMatchObject({ level: 30, method: 'POST', status: 201, msg: 'request' })
    expect(typeof line.time).toBe('string')

    // An id chosen by the proxy in front is kept, so its logs and ours line up.
    const proxied = await client.get('/api/me', { 'x-request-id': 'edge-proxy-0001' })
    expect(proxied.headers.get('x-request-id')).toBe('edge-proxy-0001')
    await waitForLine(l => l.requestId === 'edge-proxy-0001' && l.path === '/api/me')

    // Secrets that passed through: a wrong password, the session cookie, a reset link's token and its mail.
    expect((await new ApiClient(server.url).post('/api/auth/sign-in', { email, password: 'a-wrong-guess-at-the-password' })).status).toBe(401)
    const since = new Date()
    expect((await client.post('/api/auth/reset-request', { email })).status).toBe(200)
    const mail = await waitForMail(email, receivedAfter(since, m => m.subject.includes('Reset')))
    const token = new URL(linkIn(mail, '/reset-password')).searchParams.get('token')!
    const reset = await new ApiClient(server.url).post('/api/auth/reset', { token, password: 'new-reeds-along-the-edge' })
    expect(reset.status).toBe(200)
    const invitationLink = await new ApiClient(server.url).get(`/api/invitations/${token}`)
    await waitForLine(l => l.requestId === invitationLink.headers.get('x-request-id'))

    const output = server.output()
    const cookieValue = [...client.cookies.values()][0]!
    const mailLines = mail.text.split('\n').map(l => l.trim()).filter(l => l.length > 25)
    expect(mailLines.length).toBeGreaterThan(0)
    for (const secret of [password, 'a-wrong-guess-at-the-password', 'new-reeds-along-the-edge', cookieValue, token, ...mailLines]) {
      expect(output, 'a secret reached the log').not.toContain(secret)
    }
    // Every request line carries an id.
    const requestLines = logLines().filter(l => l.msg === 'request' || l.msg === 'request failed')
    expect(requestLines.length).toBeGreaterThan(4)
    for (const l of requestLines) expect(l.requestId).toBeTruthy()
  })
})
