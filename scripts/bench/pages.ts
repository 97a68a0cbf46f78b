// Pages as a phone on a slow link gets them: Debian's Chromium (playwright-core), the network throttled through
// the DevTools protocol to 1.6 Mbps down, 750 kbps up and 150 ms latency, the cache empty. Reports the JavaScript
// bytes on the wire, first contentful paint and largest contentful paint of the sign-in, pond and fish pages.
// Run: bash scripts/bench/run.sh pages
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import pg from 'pg'
import { chromium, type BrowserContext } from 'playwright-core'
import { seedBusyFish, seedTenFishPond } from './seeds'
import { percentileOf, record, signInCookie, startBenchServer } from './support'

const PORT = Number(process.env.BENCH_PORT ?? 3540)
const RUNS = Number(process.env.BENCH_PAGE_RUNS ?? 3)
const EMAIL = 'bench-pages@example.com'
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 })
// A slow mobile link as Lighthouse's mobile preset models it (1.6 Mbps, 150 ms round trip).
const SLOW_LINK = { offline: false, latency: 150, downloadThroughput: 1.6e6 / 8, uploadThroughput: 750e3 / 8 }

interface PageLoad { jsBytes: number, requests: number, fcp: number, lcp: number }

async function loadOnce(context: BrowserContext, url: string): Promise<PageLoad> {
  const page = await context.newPage()
  const cdp = await context.newCDPSession(page)
  await cdp.send('Network.enable')
  await cdp.send('Network.setCacheDisabled', { cacheDisabled: true })
  await cdp.send('Network.emulateNetworkConditions', SLOW_LINK)
  const scripts = new Set<string>()
  let jsBytes = 0
  let requests = 0
  cdp.on('Network.responseReceived', (e) => {
    if (e.type === 'Script') scripts.add(e.requestId)
  })
  cdp.on('Network.loadingFinished', (e) => {
    requests++
    if (scripts.has(e.requestId)) jsBytes += e.encodedDataLength
  })
  await page.addInitScript(() => {
    const w = window as unknown as { __lcp: number }
    w.__lcp = 0
    new PerformanceObserver(list => list.getEntries().forEach(entry => (w.__lcp = entry.startTime))).observe({ type: 'largest-contentful-paint', buffered: true })
  })
  await page.goto(url, { waitUntil: 'networkidle', timeout: 120_000 })
  await page.waitForTimeout(500)
  const paints = await page.evaluate(() => ({
    fcp: performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? Number.NaN,
    lcp: (window as unknown as { __lcp: number }).__lcp,
  }))
  await page.close()
  return { jsBytes, requests, ...paints }
}

async function main() {
  const { userId, fishId } = await seedBusyFish(pool, EMAIL)
  const pondId = await seedTenFishPond(pool, userId)
  const server = await startBenchServer(PORT)
  const profile = mkdtempSync(join(tmpdir(), 'fintrail-bench-chromium-'))
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: ['--headless=new', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'],
    viewport: { width: 390, height: 844 },
    deviceScaleFactor: 2,
    isMobile: true,
    hasTouch: true,
    // A service worker installed on the first page would cache every script, and the later pages would show a warm cache.
    serviceWorkers: 'block',
  })
  try {
    const cookie = await signInCookie(server.url, EMAIL)
    const [name, value] = cookie.split('; ')[0]!.split('=')
    const pages = [
      { label: 'sign-in page /sign-in', path: '/sign-in', signedIn: false },
      { label: 'pond page /ponds/:id (10 fish)', path: `/ponds/${pondId}`, signedIn: true },
      { label: 'fish profile /fish/:id (5,000 entries)', path: `/fish/${fishId}`, signedIn: true },
    ]
    console.log(`Pages in Chromium on a throttled link (1.6 Mbps, 150 ms), empty cache, median of ${RUNS}:`)
    for (const { label, path, signedIn } of pages) {
      await context.clearCookies()
      if (signedIn) await context.addCookies([{ name: name!, value: value!, url: server.url }])
      const loads: PageLoad[] = []
      for (let i = 0; i < RUNS; i++) loads.push(await loadOnce(context, `${server.url}${path}`))
      const median = (pick: (l: PageLoad) => number) => percentileOf(loads.map(pick), 0.5)
      record({
        what: label,
        figure: `JS ${(median(l => l.jsBytes) / 1024).toFixed(0)} KB, first paint ${(median(l => l.fcp) / 1000).toFixed(2)} s, largest paint ${(median(l => l.lcp) / 1000).toFixed(2)} s`,
        comparison: path.startsWith('/fish') ? 'before issue 11: 887 KB JS, first paint 1.8 s, largest 5.4 s' : '–',
        goal: path.startsWith('/fish') ? 'largest paint ≤ 2.5 s, JS ≤ 150 KB' : 'largest paint ≤ 2.5 s',
        met: median(l => l.lcp) <= 2500 && (!path.startsWith('/fish') || median(l => l.jsBytes) <= 150 * 1024),
      })
    }
  }
  finally {
    await context.close()
    rmSync(profile, { recursive: true, force: true })
    await server.stop()
    await pool.end()
  }
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
