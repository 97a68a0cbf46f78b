// Draws the app's icons (the fish on the orange disc from the header) with sharp into public/icons.
// Run after changing the drawing: `npx tsx scripts/make-icons.ts`; the PNGs are committed.
import { mkdirSync } from 'node:fs'
import { resolve } from 'node:path'
import sharp from 'sharp'

const OUT = resolve(import.meta.dirname, '../public/icons')
const POND = '#0d3b3e'
const ORANGE = '#e85a12'
const FISH = 'M6 17c5-6 13-7 18-3l4-3-1 5 1 5-4-3c-5 4-13 3-18-1z'

/** `padding` is the share of the square left around the disc: maskable icons keep their drawing in the middle 80 %. */
function drawing(padding: number, background: string | null) {
  const scale = (1 - 2 * padding) * 32 / 30
  const offset = padding * 32 - scale
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 32 32">
  ${background ? `<rect width="32" height="32" fill="${background}"/>` : ''}
  <g transform="translate(${offset} ${offset}) scale(${scale})">
    <circle cx="16" cy="16" r="15" fill="${ORANGE}"/>
    <path d="${FISH}" fill="#fff"/>
    <circle cx="10.5" cy="15.8" r="1" fill="${POND}"/>
  </g>
</svg>`
}

const ICONS = [
  { file: 'icon-192.png', size: 192, padding: 0.02, background: null },
  { file: 'icon-512.png', size: 512, padding: 0.02, background: null },
  { file: 'maskable-512.png', size: 512, padding: 0.14, background: POND },
  { file: 'apple-touch-icon-180.png', size: 180, padding: 0.1, background: POND },
  { file: 'favicon-32.png', size: 32, padding: 0, background: null },
]

mkdirSync(OUT, { recursive: true })
for (const icon of ICONS) {
  await sharp(Buffer.from(drawing(icon.padding, icon.background)), { density: Math.ceil(72 * icon.size / 32) })
    .resize(icon.size, icon.size).png({ compressionLevel: 9 }).toFile(resolve(OUT, icon.file))
  console.log(`public/icons/${icon.file}`)
}
