import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb } from '../support/db'
import { MAIN_PORT } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'
import { startServer } from '../support/server'

afterAll(closeTestDb)

// The security headers (nuxt-security, configured in nuxt.config.ts) on HTML pages and on everything else,
// and the module's request guards left off so the app's own rules decide what a request may do.

async function page(client: ApiClient, path: string) {
  const headers: Record<string, string> = { accept: 'text/html' }
  if (client.cookies.size) headers.cookie = client.cookieHeader()
  const response = await fetch(client.baseUrl + path, { headers, redirect: 'manual' })
  return { status: response.status, headers: response.headers, html: await response.text() }
}

function directives(csp: string) {
  return Object.fromEntries(csp.split(';').map(s => s.trim()).filter(Boolean).map((d) => {
    const [name, ...sources] = d.split(/\s+/)
    return [name!, sources]
  }))
}

function expectHtmlHeaders(headers: Headers) {
  const csp = directives(headers.get('content-security-policy') ?? '')
  expect(csp['frame-ancestors']).toEqual(['\'none\''])
  expect(csp['script-src']).toContain('\'strict-dynamic\'')
  expect(csp['script-src']!.some(s => /^'nonce-[A-Za-z0-9+/=]{16,}'$/.test(s))).toBe(true)
  expect(csp['script-src']).not.toContain('\'unsafe-eval\'')
  expect(csp['script-src']).not.toContain('\'unsafe-inline\'')
  expect(csp['script-src-attr']).toEqual(['\'none\''])
  expect(csp['object-src']).toEqual(['\'none\''])
  expect(csp['upgrade-insecure-requests']).toBeUndefined()
  expect(headers.get('x-content-type-options')).toBe('nosniff')
  expect(headers.get('referrer-policy')).toBe('strict-origin-when-cross-origin')
  expect(headers.get('x-frame-options')).toBe('DENY')
  expect(headers.get('x-powered-by')).toBeNull()
}

const nonceOf = (headers: Headers) => headers.get('content-security-policy')!.match(/'nonce-([^']+)'/)![1]!

describe('security headers', () => {
  it('come with every HTML page, with a fresh nonce that every script of the page carries', async () => {
    const anonymous = new ApiClient()
    const { client } = await signedInUser()
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    for (const [who, path] of [[anonymous, '/sign-in'], [anonymous, '/sign-up'], [client, '/'], [client, `/ponds/${pond.id}`],
      [client, `/fish/${fish.id}`], [client, `/fish/${fish.id}/record`]] as const) {
      const { status, headers, html } = await page(who, path)
      expect(status, path).toBe(200)
      expectHtmlHeaders(headers)
      const nonce = nonceOf(headers)
      const scripts = html.match(/<script\b[^>]*>/g) ?? []
      expect(scripts.length, path).toBeGreaterThan(0)
      for (const tag of scripts) expect(tag, path).toContain(`nonce="${nonce}"`)
      expect(html, path).not.toMatch(/\son[a-z]+="/)
    }
    const first = nonceOf((await page(anonymous, '/sign-in')).headers)
    const second = nonceOf((await page(anonymous, '/sign-in')).headers)
    expect(first).not.toBe(second)
  })

  it('send nosniff and the referrer policy with JSON and assets too', async () => {
    const { client } = await signedInUser()
    const asset = (await page(new ApiClient(), '/sign-in')).html.match(/src="(\/_nuxt\/[^"]+\.js)"/)![1]!
    for (const path of ['/api/health', '/api/me', asset]) {
      const response = await fetch(client.baseUrl + path, { headers: { cookie: client.cookieHeader() } })
      expect(response.status, path).toBe(200)
      expect(response.headers.get('x-content-type-options'), path).toBe('nosniff')
      expect(response.headers.get('referrer-policy'), path).toBe('strict-origin-when-cross-origin')
    }
    // An error answer keeps nosniff; Nitro's error handler makes its referrer policy stricter still.
    const refused = await fetch(`${client.baseUrl}/api/me`)
    expect(refused.status).toBe(401)
    expect(refused.headers.get('x-content-type-options')).toBe('nosniff')
    expect(['no-referrer', 'strict-origin-when-cross-origin']).toContain(refused.headers.get('referrer-policy'))
  })

  it('leave the module’s request guards off: no rate limit, no size limit, no text filter of our own data', async () => {
    const anonymous = new ApiClient()
    // nuxt-security's default limiter would answer 429 after 150 requests in 5 minutes from one address.
    const statuses = new Set<number>()
    for (let i = 0; i < 40; i++) {
      const batch = await Promise.all(Array.from({ length: 5 }, () => fetch(`${anonymous.baseUrl}/api/health`)))
      for (const response of batch) statuses.add(response.status)
    }
    expect([...statuses]).toEqual([200])
    // Its XSS filter would refuse this; for us it is a name like any other, kept as typed.
    const { client } = await signedInUser()
    const pond = await createPond(client, { name: 'Pond <script>alert(1)</script>' })
    expect(pond.name).toBe('Pond <script>alert(1)</script>')
    // Its size limiter would refuse a JSON body over 2 MB with 413 before our route could answer with its own 400.
    const long = await client.post(`/api/ponds/${pond.id}/fish`, { name: 'x'.repeat(2_500_000), species: 'koi' })
    expect(long.status).toBe(400)
    expect(long.body.data.fieldErrors.name).toBeDefined()
  })

  it('upgrade every request to https only when the public origin is https', { timeout: 90_000 }, async () => {
    const server = await startServer(MAIN_PORT + 16, { NUXT_APP_ORIGIN: 'https://fintrail.example' })
    try {
      const { headers } = await page(new ApiClient(server.url), '/sign-in')
      expect(directives(headers.get('content-security-policy')!)['upgrade-insecure-requests']).toEqual([])
      expect(headers.get('content-security-policy')).toMatch(/frame-ancestors 'none'/)
    }
    finally {
      await server.stop()
    }
  })
})
