// How pages and their code reach the browser: compressed answers, precompressed assets, and the fish
// profile naming none of the code that loads only when opened or scrolled to.
import { existsSync, readdirSync, readFileSync } from 'node:fs'
import { request } from 'node:http'
import { resolve } from 'node:path'
import { brotliDecompressSync, gunzipSync } from 'node:zlib'
import { describe, expect, it } from 'vitest'
import { MAIN_URL, ROOT } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'

// The manifest names files relative to the build's asset folder.
const ASSETS = resolve(ROOT, '.output/public/_nuxt')
// The client manifest as the built server reads it (nuxt build writes it into .output).
const MANIFEST = resolve(ROOT, '.output/server/chunks/build/client.precomputed.mjs')

/** The raw bytes and headers of one GET, as a browser sending `acceptEncoding` would receive them. */
function rawGet(path: string, acceptEncoding: string | null, cookie = ''): Promise<{ status: number, headers: Record<string, string | string[] | undefined>, bytes: Buffer }> {
  return new Promise((done, fail) => {
    const headers: Record<string, string> = {}
    if (acceptEncoding) headers['accept-encoding'] = acceptEncoding
    if (cookie) headers.cookie = cookie
    request(`${MAIN_URL}${path}`, { headers }, (response) => {
      const parts: Buffer[] = []
      response.on('data', (part: Buffer) => parts.push(part))
      response.on('end', () => done({ status: response.statusCode!, headers: response.headers, bytes: Buffer.concat(parts) }))
      response.on('error', fail)
    }).on('error', fail).end()
  })
}

/** The body as the browser reads it, whatever the Content-Encoding. */
function decoded(answer: { headers: Record<string, string | string[] | undefined>, bytes: Buffer }) {
  const encoding = answer.headers['content-encoding']
  if (encoding === 'br') return brotliDecompressSync(answer.bytes).toString('utf8')
  if (encoding === 'gzip') return gunzipSync(answer.bytes).toString('utf8')
  expect(encoding).toBeUndefined()
  return answer.bytes.toString('utf8')
}

/** The built client's entry script, from the manifest the server renders with. */
async function entryScript(): Promise<string> {
  const manifest = (await import(MANIFEST)).default as { entrypoints: string[], modules: Record<string, { file: string }> }
  return manifest.modules[manifest.entrypoints[0]!]!.file
}

/** The /_nuxt/ scripts a page loads before it runs: <script src> and <link rel="modulepreload">, as asset file names. */
function scriptsNamed(html: string) {
  const tags = [...html.matchAll(/<(?:script|link)\b[^>]*>/g)].map(match => match[0])
    .filter(tag => tag.startsWith('<script') || /rel="modulepreload"/.test(tag))
  return [...new Set(tags.flatMap(tag => /(?:src|href)="\/_nuxt\/([^"]+\.js)"/.exec(tag)?.[1] ?? []))]
}

describe('delivery', () => {
  it('compresses JSON above 1 KB in the encoding the browser takes, leaves small answers alone, and sends error pages whole', async () => {
    const { client } = await signedInUser()
    const pond = await createPond(client)
    for (let i = 0; i < 12; i++) await createFish(client, pond.id)
    // A page that is not there must reach the browser whole whatever encodings it accepts: Nuxt renders it with
    // an inner request that must not be compressed on its own (server/middleware/00.compression.ts).
    for (const accepts of ['gzip, deflate, br', 'gzip', null]) {
      const missing = await rawGet('/fish/00000000-0000-4000-8000-000000000000', accepts, client.cookieHeader())
      expect(missing.status).toBe(404)
      expect(missing.headers['content-encoding']).toBe(accepts ? accepts.includes('br') ? 'br' : 'gzip' : undefined)
      const html = decoded(missing)
      expect(html.length).toBeGreaterThan(500)
      expect(html).toMatch(/^<!DOCTYPE html>/i)
      expect(html).toContain('</html>')
    }
    const list = await rawGet(`/api/ponds/${pond.id}/fish`, 'br', client.cookieHeader())
    expect(list.status).toBe(200)
    expect(list.headers['content-encoding']).toBe('br')
    expect((await rawGet('/api/health', 'br')).headers['content-encoding']).toBeUndefined()
  })

  it('compresses a signed-in page and the browser decodes the whole page from it', async () => {
    const { client } = await signedInUser()
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    const plain = await rawGet(`/fish/${fish.id}`, null, client.cookieHeader())
    expect(plain.status).toBe(200)
    expect(plain.headers['content-encoding']).toBeUndefined()
    for (const [accepts, encoding] of [['gzip, deflate, br', 'br'], ['gzip, deflate', 'gzip']] as const) {
      const page = await rawGet(`/fish/${fish.id}`, accepts, client.cookieHeader())
      expect(page.status).toBe(200)
      expect(page.headers['content-encoding']).toBe(encoding)
      expect(page.headers.vary).toMatch(/accept-encoding/i)
      expect(page.bytes.length).toBeLessThan(plain.bytes.length)
      const html = decoded(page)
      expect(html).toContain('</html>')
      expect(html).toContain(fish.name)
      // The same page as sent uncompressed, apart from what differs per request (CSP nonce, request ids).
      expect(html.length).toBeGreaterThan(plain.bytes.length * 0.95)
      expect(html.length).toBeLessThan(plain.bytes.length * 1.05)
    }
  })

  it('serves the built JavaScript precompressed (brotli and gzip files beside each asset)', async () => {
    const entry = await entryScript()
    expect(existsSync(resolve(ASSETS, entry + '.br'))).toBe(true)
    expect(existsSync(resolve(ASSETS, entry + '.gz'))).toBe(true)
    const asset = await rawGet(`/_nuxt/${entry}`, 'gzip, deflate, br')
    expect(asset.status).toBe(200)
    expect(asset.headers['content-encoding']).toBe('br')
    expect(asset.bytes.equals(readFileSync(resolve(ASSETS, entry + '.br')))).toBe(true)
  })

  it('names neither the uploader\'s nor the charts\' code in the fish profile it renders, and hints no prefetch', async () => {
    const { client } = await signedInUser()
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    const page = await rawGet(`/fish/${fish.id}`, null, client.cookieHeader())
    expect(page.status).toBe(200)
    const html = page.bytes.toString('utf8')
    // Lazy parts are not hinted for prefetch either (build:manifest in nuxt.config.ts); the byte budget of the
    // whole first load is kept in tests/browser/first-load.test.ts, which counts what Chromium really fetches.
    expect(html).not.toMatch(/<link[^>]*rel="prefetch"[^>]*\.js"/)
    const files = scriptsNamed(html)
    expect(files.length).toBeGreaterThan(0)
    for (const source of files.map(file => readFileSync(resolve(ASSETS, file)))) {
      // Strings that survive minification: Uppy's dashboard class names, Chart.js's own error text.
      expect(source.includes('uppy-Dashboard')).toBe(false)
      expect(source.includes('Canvas is already in use')).toBe(false)
    }
    // Both are still in the build, for when they are opened or scrolled to.
    const built = readdirSync(ASSETS).filter(file => file.endsWith('.js')).map(file => readFileSync(resolve(ASSETS, file)))
    expect(built.some(source => source.includes('uppy-Dashboard'))).toBe(true)
    expect(built.some(source => source.includes('Canvas is already in use'))).toBe(true)
  })
})
