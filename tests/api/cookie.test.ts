import { describe, expect, it } from 'vitest'
import { randomUUID } from 'node:crypto'
import { MAIN_PORT } from '../support/env'
import { startServer } from '../support/server'
import { TEST_PASSWORD } from '../support/factories'

async function signUpCookie(baseUrl: string, origin?: string) {
  const response = await fetch(`${baseUrl}/api/auth/sign-up`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...(origin ? { origin } : {}) },
    body: JSON.stringify({ name: 'Cookie Check', email: `cookie-${randomUUID().slice(0, 8)}@test.example`, password: TEST_PASSWORD }),
  })
  expect(response.status).toBe(201)
  return response.headers.getSetCookie().find(c => c.startsWith('fintrail-session='))!
}

describe('session cookie flags', () => {
  it('is HttpOnly and SameSite=Lax, and plain on the http test origin', async () => {
    const cookie = await signUpCookie(`http://127.0.0.1:${MAIN_PORT}`)
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    expect(cookie).not.toMatch(/;\s*Secure/i)
  })

  it('is Secure unless NUXT_SESSION_COOKIE_SECURE=false says otherwise (npm start says so for its http origin)', async () => {
    const https = await startServer(MAIN_PORT + 19, { NUXT_APP_ORIGIN: 'https://fintrail.example', NUXT_SESSION_COOKIE_SECURE: null })
    try {
      expect(await signUpCookie(https.url, 'https://fintrail.example')).toMatch(/;\s*Secure/i)
    }
    finally {
      await https.stop()
    }
    const configured = await startServer(MAIN_PORT + 19, { NUXT_APP_ORIGIN: 'https://fintrail.example', NUXT_SESSION_COOKIE_SECURE: 'false' })
    try {
      expect(await signUpCookie(configured.url, 'https://fintrail.example')).not.toMatch(/;\s*Secure/i)
    }
    finally {
      await configured.stop()
    }
  })
})
