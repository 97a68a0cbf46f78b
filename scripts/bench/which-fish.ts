// "Which fish is this?" on a labelled set of generated pictures (not photographs of real fish): top-1 and
// top-3 accuracy per condition and the time per query, then a pond of 50 fish × 5 reference photos.
import { randomUUID } from 'node:crypto'
import { performance } from 'node:perf_hooks'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import pg from 'pg'
import { decodeForFeatures } from '../../server/fish-id/decode'
import { extractFeatures, FEATURES_VERSION, packFeatures, type FishFeatures } from '../../server/fish-id/features'
import { rankFish, type Reference } from '../../server/fish-id/match'
import { loadOpenCv, openCv } from '../../server/fish-id/opencv'
import { BENCH_PASSWORD, signInCookie, startBenchServer } from './support'
import { benchFish, CONDITIONS, queryShot, referenceShots, renderShot, rotatedCroppedDarker, type BenchFish, type Condition } from './which-fish-set'

const FISH = Number(process.env.WHICH_FISH_COUNT ?? 50)
const REFERENCES = 5

async function main() {
  await loadOpenCv()
  const cv = openCv()
  const fish = benchFish(FISH)
  const started = performance.now()
  const references: Reference[] = []
  for (const f of fish) {
    for (const [i, shot] of referenceShots(f, REFERENCES).entries()) {
      const features = extractFeatures(cv, await decodeForFeatures(await renderShot(f, shot)))
      references.push({ photoId: `${f.id}/ref-${i}`, fishId: f.id, features })
    }
  }
  console.log(`${fish.length} fish × ${REFERENCES} reference photos: features in ${((performance.now() - started) / 1000).toFixed(1)} s`)

  const rows: { condition: Condition | 'look-alike pairs', top1: number, top3: number, n: number, ms: number[] }[] = []
  const lookAlikes = new Set(fish.flatMap(f => (f.lookAlikeOf ? [f.id, f.lookAlikeOf] : [])))
  const pairRow = { condition: 'look-alike pairs' as const, top1: 0, top3: 0, n: 0, ms: [] as number[] }
  const allTimes: number[] = []
  for (const condition of CONDITIONS) {
    const row = { condition, top1: 0, top3: 0, n: 0, ms: [] as number[] }
    for (const f of fish) {
      const picture = await renderShot(f, queryShot(f, condition))
      const t0 = performance.now()
      let ranked: { fishId: string }[] = []
      try {
        const query: FishFeatures = extractFeatures(cv, await decodeForFeatures(picture), { withMirror: true })
        ranked = rankFish(cv, query, references)
      }
      catch { /* no fish found: counts as a miss */ }
      const ms = performance.now() - t0
      const position = ranked.findIndex(r => r.fishId === f.id)
      for (const target of lookAlikes.has(f.id) ? [row, pairRow] : [row]) {
        target.n++
        if (position === 0) target.top1++
        if (position >= 0 && position < 3) target.top3++
        target.ms.push(ms)
      }
      allTimes.push(ms)
      if (process.env.WHICH_FISH_VERBOSE && position !== 0) console.log(`  ${condition}: ${f.id} (${f.pattern.variety}) ranked ${position < 0 ? 'not in top 5' : position + 1}; top: ${ranked.slice(0, 3).map(r => r.fishId).join(', ')}`)
    }
    rows.push(row)
    console.log(`${condition.padEnd(20)} top-1 ${pct(row.top1, row.n)}  top-3 ${pct(row.top3, row.n)}  median ${median(row.ms).toFixed(0)} ms/query`)
  }
  rows.push(pairRow)
  const n = rows.slice(0, -1).reduce((s, r) => s + r.n, 0)
  const top1 = rows.slice(0, -1).reduce((s, r) => s + r.top1, 0)
  const top3 = rows.slice(0, -1).reduce((s, r) => s + r.top3, 0)
  console.log(`${'look-alike pairs'.padEnd(20)} top-1 ${pct(pairRow.top1, pairRow.n)}  top-3 ${pct(pairRow.top3, pairRow.n)}  (${pairRow.n} queries of fish with a look-alike)`)
  console.log(`${'overall'.padEnd(20)} top-1 ${pct(top1, n)}  top-3 ${pct(top3, n)}  (${n} queries; goals: top-1 ≥ 85 %, top-3 ≥ 95 %, every condition top-3 ≥ 80 %)`)
  console.log(`time per query (decode, features, ranking ${references.length} reference photos of ${fish.length} fish): median ${median(allTimes).toFixed(0)} ms, p95 ${percentile(allTimes, 0.95).toFixed(0)} ms, max ${Math.max(...allTimes).toFixed(0)} ms`)
  console.log('| condition | top-1 | top-3 | median ms/query |')
  console.log('|---|---|---|---|')
  for (const r of rows) console.log(`| ${r.condition} | ${pct(r.top1, r.n)} | ${pct(r.top3, r.n)} | ${median(r.ms).toFixed(0)} |`)
  console.log(`| overall | ${pct(top1, n)} | ${pct(top3, n)} | ${median(allTimes).toFixed(0)} |`)
  if (process.env.DATABASE_URL) await throughTheRoute(fish, references)
}

/**
 * The same pond behind the real route: the reference photos' stored features go into a scratch
 * database, and the built server answers POST /api/ponds/:id/identify (worker thread included).
 */
async function throughTheRoute(fish: BenchFish[], references: Reference[]) {
  const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 })
  const hash = await new Hash(new Scrypt({})).make(BENCH_PASSWORD)
  const { rows: [user] } = await pool.query(`insert into users (name, email, password_hash) values ('Bench Owner', 'bench@example.com', $1) returning id`, [hash])
  const { rows: [pond] } = await pool.query(`insert into ponds (name, volume_litres) values ('Bench pond', 50000) returning id`)
  await pool.query(`insert into memberships (pond_id, user_id, role) values ($1, $2, 'owner')`, [pond.id, user.id])
  const fishIds = new Map<string, string>()
  for (const f of fish) {
    const { rows: [row] } = await pool.query(`insert into fish (pond_id, name, species, scientific_name, variety) values ($1, $2, $3, $4, $5) returning id`, [pond.id, f.id, f.pattern.species, f.pattern.species === 'koi' ? 'Cyprinus carpio' : 'Carassius auratus', f.pattern.variety])
    fishIds.set(f.id, row.id)
  }
  for (const reference of references) {
    const { rows: [photo] } = await pool.query(`insert into photos (fish_id, uploader_id, upload_id, view, state, mime, width, height, bytes) values ($1, $2, $3, 'top', 'ready', 'image/jpeg', 640, 480, 1) returning id`, [fishIds.get(reference.fishId), user.id, randomUUID().replaceAll('-', '')])
    await pool.query(`insert into photo_features (photo_id, version, features) values ($1, $2, $3)`, [photo.id, FEATURES_VERSION, packFeatures(reference.features)])
  }
  const server = await startBenchServer(Number(process.env.FINTRAIL_TEST_PORT ?? 3500) + 17)
  try {
    const cookie = await signInCookie(server.url, 'bench@example.com')
    // The server starts the worker and OpenCV a little after it starts; give it the time it takes.
    await new Promise(resolve => setTimeout(resolve, 8000))
    const times: number[] = []
    let top1 = 0
    const sample = fish.slice(0, 20)
    for (const [i, f] of sample.entries()) {
      const form = new FormData()
      form.append('photo', new Blob([new Uint8Array(await renderShot(f, rotatedCroppedDarker(f)))], { type: 'image/jpeg' }), 'query.jpg')
      const t0 = performance.now()
      const response = await fetch(`${server.url}/api/ponds/${pond.id}/identify`, { method: 'POST', body: form, headers: { cookie } })
      const body = await response.json() as { candidates: { fishId: string }[] }
      times.push(performance.now() - t0)
      if (i === 0) console.log(`route, first request (worker started by the server at start-up): ${(performance.now() - t0).toFixed(0)} ms`)
      if (body.candidates?.[0]?.fishId === fishIds.get(f.id)) top1++
    }
    console.log(`route POST /api/ponds/:id/identify, ${fish.length} fish × ${REFERENCES} reference photos, ${times.length} rotated, cropped, darker photos (the first included): median ${median(times).toFixed(0)} ms, p95 ${percentile(times, 0.95).toFixed(0)} ms, max ${Math.max(...times).toFixed(0)} ms; top-1 ${pct(top1, sample.length)} (goal: under 2 s)`)
  }
  finally {
    server.stop()
    await pool.end()
  }
}

const pct = (k: number, n: number) => `${((100 * k) / Math.max(n, 1)).toFixed(1)} %`
const median = (values: number[]) => percentile(values, 0.5)
function percentile(values: number[], q: number) {
  const sorted = [...values].sort((a, b) => a - b)
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] ?? 0
}

main().then(() => process.exit(0), (error) => {
  console.error(error)
  process.exit(1)
})
