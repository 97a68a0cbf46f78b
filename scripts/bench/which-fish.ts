// "Which fish is this?" on a labelled set of generated pictures (not photographs of real fish): top-1 and
// top-3 accuracy per condition and the time per query, then a pond of 50 fish × 5 reference photos.
import { performance } from 'node:perf_hooks'
import { decodeForFeatures } from '../../server/fish-id/decode'
import { extractFeatures, type FishFeatures } from '../../server/fish-id/features'
import { rankFish, type Reference } from '../../server/fish-id/match'
import { loadOpenCv, openCv } from '../../server/fish-id/opencv'
import { benchFish, CONDITIONS, queryShot, referenceShots, renderShot, type Condition } from './which-fish-set'

const FISH = Number(process.env.WHICH_FISH_COUNT ?? 50)
const REFERENCES = 5

async function main() {
  await loadOpenCv(); const cv = openCv()
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
