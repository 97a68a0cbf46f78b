// A/B of the WebP effort for the derived photo sizes (scripts/bench/photos.ts's 12 MP image and a smoother one):
// time and bytes of all three WebP sizes from the same decoded pixels, 1 thread, efforts interleaved.
// Run: node_modules/.bin/tsx scripts/bench/photo-ab.ts   (RUNS, default 5)
import sharp from 'sharp'
import { DERIVED_SIZES } from '../../shared/utils/photo-limits'

sharp.concurrency(1)
sharp.cache(false)
const RUNS = Number(process.env.RUNS ?? 5)
const EFFORTS = [0, 1, 2, 3, 4]

async function image(blur: number) {
  const noise = await sharp({ create: { width: 4000, height: 3000, channels: 3, background: { r: 41, g: 100, b: 110 }, noise: { type: 'gaussian', mean: 120, sigma: 60 } } }).blur(blur).raw().toBuffer()
  const jpeg = await sharp(noise, { raw: { width: 4000, height: 3000, channels: 3 } }).jpeg({ quality: 90 }).toBuffer()
  const sizes = []
  let current = await sharp(jpeg).resize(2048, 2048, { fit: 'inside' }).raw().toBuffer({ resolveWithObject: true })
  for (const side of [...DERIVED_SIZES].reverse()) {
    if (Math.max(current.info.width, current.info.height) > side) current = await sharp(current.data, { raw: { width: current.info.width, height: current.info.height, channels: 3 } }).resize(side, side, { fit: 'inside' }).raw().toBuffer({ resolveWithObject: true })
    sizes.push(current)
  }
  return sizes
}

for (const [label, blur] of [['fine texture (the photos benchmark)', 1.2], ['smooth (blur 6)', 6]] as const) {
  const sizes = await image(blur)
  const times = new Map<number, number[]>(EFFORTS.map(e => [e, []]))
  const bytes = new Map<number, number>()
  for (let run = 0; run <= RUNS; run++) {
    for (const effort of EFFORTS) {
      const started = performance.now()
      let total = 0
      for (const s of sizes) total += (await sharp(s.data, { raw: { width: s.info.width, height: s.info.height, channels: 3 } }).webp({ quality: 80, effort }).toBuffer()).length
      if (run) times.get(effort)!.push(performance.now() - started)
      bytes.set(effort, total)
    }
  }
  console.log(`${label}:`)
  for (const effort of EFFORTS) {
    const t = times.get(effort)!.sort((a, b) => a - b)
    console.log(`  effort ${effort}: median ${t[Math.floor(t.length / 2)]!.toFixed(0)} ms (min ${t[0]!.toFixed(0)}), ${(bytes.get(effort)! / 1024).toFixed(0)} KB for the three sizes`)
  }
}
