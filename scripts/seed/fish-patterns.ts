// Invented fish drawn from above: a body outline, fins, scale texture and patches in the trade's
// colours, written as SVG and rendered by sharp. Everything follows from one seed per fish, so a
// demo fish and a benchmark fish look the same on every run. Used by the demo seed and by the
// "which fish is this?" benchmark, which renders each fish again under other conditions.
import sharp from 'sharp'
import { seededRandom } from './growth'

/** The colours koi and goldfish keepers name patches by; `metallic*` are the shiny (ogon) skins. */
export const TRADE_COLOURS = {
  white: '#f3efe6',
  red: '#c8321e', // hi
  orange: '#ee7420',
  black: '#1c1a1b', // sumi
  yellow: '#e6bf2e', // ki
  blue: '#6d86a0', // the blue-grey of asagi and shusui backs
  brown: '#8d6a44', // chagoi
  metallicGold: '#d9a52c',
  metallicYellow: '#ecd35a',
  platinum: '#e4e6e8',
} as const
export type TradeColour = keyof typeof TRADE_COLOURS

export type Build = 'koi' | 'slender' | 'round'

/** A patch in body coordinates: `u` runs from the snout (0) to the root of the tail (1), `v` across the back from left (−1) to right (1). */
export interface Patch {
  u: number
  v: number
  /** Half-length along the body, as a fraction of the body length. */
  ru: number
  /** Half-width across the body, as a fraction of the body's widest width. */
  rv: number
  colour: TradeColour
  /** Radius multipliers around the outline: what makes each patch its own shape. */
  wobble: number[]
}

export interface FishPattern {
  seed: number
  species: 'koi' | 'goldfish'
  variety: string
  build: Build
  base: TradeColour
  metallic: boolean
  /** Doitsu koi have no scales but a row of large ones along the back. */
  doitsu: boolean
  /** Each scale edged darker (asagi, goshiki, chagoi): a net pattern. */
  net: boolean
  patches: Patch[]
  fin: TradeColour
  finTips?: TradeColour
  tail: 'short' | 'long' | 'twin'
  wen: boolean
}

type Random = () => number

function between(random: Random, low: number, high: number) {
  return low + (high - low) * random()
}

function blob(random: Random, u: number, v: number, ru: number, rv: number, colour: TradeColour): Patch {
  const wobble = Array.from({ length: 12 }, () => between(random, 0.72, 1.22))
  return { u, v, ru, rv, colour, wobble }
}

/** Large patches down the back (kohaku-style steps), kept apart by white gaps. */
function steps(random: Random, colour: TradeColour, count: number, from = 0.05, to = 0.92): Patch[] {
  const patches: Patch[] = []
  const span = (to - from) / count
  for (let i = 0; i < count; i++) {
    const centre = from + span * (i + 0.5) + between(random, -0.2, 0.2) * span
    patches.push(blob(random, centre, between(random, -0.35, 0.35), span * between(random, 0.32, 0.5), between(random, 0.55, 0.95), colour))
  }
  return patches
}

function spots(random: Random, colour: TradeColour, count: number, size: [number, number], from = 0.15, to = 0.9): Patch[] {
  return Array.from({ length: count }, () => {
    const r = between(random, size[0], size[1])
    return blob(random, between(random, from, to), between(random, -0.8, 0.8), r, r * between(random, 2.2, 3.2), colour)
  })
}

/** The pattern of one fish: the variety decides the colours and the kind of layout, the seed the layout itself. */
export function fishPattern(seed: number, species: 'koi' | 'goldfish', variety: string): FishPattern {
  const random = seededRandom(seed)
  const name = variety.toLowerCase()
  const koi = (base: TradeColour, patches: Patch[], extra: Partial<FishPattern> = {}): FishPattern => ({
    seed, species, variety, build: 'koi', base, metallic: false, doitsu: false, net: false, patches, fin: base, tail: 'short', wen: false, ...extra,
  })
  const goldfish = (base: TradeColour, patches: Patch[], extra: Partial<FishPattern> = {}): FishPattern => ({
    seed, species, variety, build: 'round', base, metallic: false, doitsu: false, net: false, patches, fin: base, tail: 'twin', wen: false, ...extra,
  })
  if (species === 'goldfish') {
    if (name.includes('oranda')) return goldfish('orange', spots(random, 'white', Math.floor(between(random, 0, 3)), [0.04, 0.08]), { wen: true })
    if (name.includes('comet')) return goldfish('orange', spots(random, 'white', Math.floor(between(random, 1, 3)), [0.04, 0.09]), { build: 'slender', tail: 'long' })
    if (name.includes('shubunkin') || name.includes('calico')) {
      return goldfish('blue', [...spots(random, 'orange', 3 + Math.floor(random() * 3), [0.05, 0.11]), ...spots(random, 'black', 6 + Math.floor(random() * 6), [0.012, 0.03])], { build: 'slender', tail: 'long', fin: 'blue', finTips: 'black' })
    }
    // Red and white (ryukin and the like): big red patches on white.
    return goldfish('white', steps(random, 'red', 2 + Math.floor(random() * 2), 0.05, 0.95), { fin: 'white' })
  }
  if (name.includes('tancho')) return koi('white', [blob(random, between(random, 0.07, 0.11), between(random, -0.08, 0.08), 0.05, 0.42, 'red')], { fin: 'white' })
  if (name.includes('kohaku')) return koi('white', steps(random, 'red', 2 + Math.floor(random() * 3)), { fin: 'white' })
  if (name.includes('sanke')) return koi('white', [...steps(random, 'red', 2 + Math.floor(random() * 2)), ...spots(random, 'black', 3 + Math.floor(random() * 4), [0.02, 0.045], 0.2)], { fin: 'white', finTips: 'black' })
  if (name.includes('showa')) {
    return koi('black', [...steps(random, 'white', 3, 0.1, 0.95), ...steps(random, 'red', 2 + Math.floor(random() * 2)), ...spots(random, 'black', 2, [0.03, 0.05])], { fin: 'white', finTips: 'black' })
  }
  if (name.includes('utsuri')) {
    const colour: TradeColour = name.includes('ki ') ? 'yellow' : name.includes('hi ') ? 'red' : 'white'
    return koi('black', [...steps(random, colour, 3 + Math.floor(random() * 2), 0.04, 0.96), ...spots(random, 'black', 2, [0.03, 0.05])], { fin: colour, finTips: 'black' })
  }
  if (name.includes('kumonryu')) return koi('black', [...steps(random, 'white', 3, 0.02, 0.9), ...spots(random, 'white', 3, [0.02, 0.04])], { doitsu: true, fin: 'black', finTips: 'white' })
  if (name.includes('shusui')) return koi('blue', [...spots(random, 'red', 4, [0.03, 0.05], 0.1, 0.9).map(p => ({ ...p, v: Math.sign(p.v || 1) * between(random, 0.75, 0.95) })), blob(random, 0.05, 0, 0.05, 0.5, 'white')], { doitsu: true, fin: 'red' })
  if (name.includes('asagi')) return koi('blue', [blob(random, 0.1, -0.85, 0.08, 0.25, 'red'), blob(random, 0.1, 0.85, 0.08, 0.25, 'red'), ...spots(random, 'red', 2, [0.03, 0.05], 0.5, 0.9).map(p => ({ ...p, v: Math.sign(p.v || 1) * 0.9 }))], { net: true, fin: 'red' })
  if (name.includes('goshiki')) return koi('red', [...steps(random, 'white', 2, 0.3, 0.95), ...spots(random, 'black', 4, [0.02, 0.04])], { net: true, fin: 'white' })
  if (name.includes('benigoi')) return koi('red', [], { fin: 'red' })
  if (name.includes('karasu')) return koi('black', [], { fin: 'black', finTips: 'white' })
  if (name.includes('chagoi')) return koi('brown', [], { net: true, fin: 'brown' })
  if (name.includes('platinum')) return koi('platinum', [], { metallic: true, fin: 'platinum' })
  if (name.includes('yamabuki')) return koi('metallicYellow', [], { metallic: true, fin: 'metallicYellow' })
  if (name.includes('ogon')) return koi('metallicGold', [], { metallic: true, fin: 'metallicGold' })
  return koi('white', steps(random, pick(random, ['red', 'black', 'yellow', 'orange']), 2 + Math.floor(random() * 3)), { fin: 'white' })
}

function pick<T>(random: Random, list: readonly T[]): T {
  return list[Math.floor(random() * list.length)]!
}

// Half-width of the body seen from above along its length, as a fraction of the widest point:
// pointed snout, widest behind the pectoral fins, narrow at the root of the tail.
const OUTLINE: Record<Build, { width: number, profile: number[] }> = {
  koi: { width: 0.24, profile: [0, 0.5, 0.78, 0.95, 1, 0.92, 0.72, 0.46, 0.26, 0.18] },
  slender: { width: 0.22, profile: [0, 0.52, 0.8, 0.96, 1, 0.9, 0.68, 0.44, 0.25, 0.17] },
  round: { width: 0.46, profile: [0, 0.6, 0.86, 0.98, 1, 0.96, 0.82, 0.58, 0.34, 0.2] },
}

function halfWidth(build: Build, u: number) {
  const { profile } = OUTLINE[build]
  const x = Math.min(Math.max(u, 0), 1) * (profile.length - 1)
  const i = Math.min(Math.floor(x), profile.length - 2)
  const t = x - i
  // Cosine interpolation keeps the outline smooth between the listed widths.
  const s = (1 - Math.cos(t * Math.PI)) / 2
  const raw = profile[i]! * (1 - s) + profile[i + 1]! * s
  return u < 0.06 ? raw * Math.sqrt(Math.max(u, 0) / 0.06) ** 0.3 : raw
}

type Point = [number, number]

/** A closed Catmull-Rom spline through the points, as SVG cubic Béziers. */
function smoothClosed(points: Point[]) {
  const n = points.length
  const f = (value: number) => value.toFixed(1)
  let d = `M${f(points[0]![0])},${f(points[0]![1])}`
  for (let i = 0; i < n; i++) {
    const p0 = points[(i - 1 + n) % n]!, p1 = points[i]!, p2 = points[(i + 1) % n]!, p3 = points[(i + 2) % n]!
    const c1: Point = [p1[0] + (p2[0] - p0[0]) / 6, p1[1] + (p2[1] - p0[1]) / 6]
    const c2: Point = [p2[0] - (p3[0] - p1[0]) / 6, p2[1] - (p3[1] - p1[1]) / 6]
    d += `C${f(c1[0])},${f(c1[1])} ${f(c2[0])},${f(c2[1])} ${f(p2[0])},${f(p2[1])}`
  }
  return `${d}Z`
}

/** Body outline in a frame where the snout is at (0, 0), the tail root at (length, 0). */
function bodyPath(build: Build, length: number) {
  const width = OUTLINE[build].width * length
  const top: Point[] = []
  const bottom: Point[] = []
  for (let i = 0; i <= 24; i++) {
    const u = i / 24
    const h = (halfWidth(build, u) * width) / 2
    top.push([u * length, -h])
    bottom.unshift([u * length, h])
  }
  return smoothClosed([...top.slice(1), ...bottom.slice(0, -1), [0, 0]])
}

function patchPath(patch: Patch, build: Build, length: number) {
  const width = OUTLINE[build].width * length
  const cx = patch.u * length
  const cy = patch.v * (halfWidth(build, patch.u) * width) / 2
  const n = patch.wobble.length
  const points: Point[] = patch.wobble.map((w, i) => {
    const a = (i / n) * Math.PI * 2
    return [cx + Math.cos(a) * patch.ru * length * w, cy + Math.sin(a) * patch.rv * width * 0.5 * w]
  })
  return smoothClosed(points)
}

function finPath(base: Point, direction: number, length: number, breadth: number) {
  // A rounded paddle leaving the body at `base`, pointing `direction` (radians).
  const along: Point = [Math.cos(direction), Math.sin(direction)]
  const across: Point = [-along[1], along[0]]
  const at = (a: number, c: number): Point => [base[0] + along[0] * a + across[0] * c, base[1] + along[1] * a + across[1] * c]
  return smoothClosed([at(0, -breadth * 0.35), at(length * 0.55, -breadth * 0.55), at(length, -breadth * 0.2), at(length * 0.95, breadth * 0.3), at(length * 0.5, breadth * 0.4), at(0, breadth * 0.3)])
}

function tailPath(tail: FishPattern['tail'], length: number, width: number) {
  const root = length
  const reach = tail === 'long' ? 0.42 : tail === 'twin' ? 0.3 : 0.24
  const spread = tail === 'twin' ? 0.7 : 0.55
  const r = reach * length
  const s = spread * width
  const notch = tail === 'long' ? 0.5 : 0.62
  return smoothClosed([[root - 0.02 * length, -0.08 * width], [root + r * 0.6, -s * 0.8], [root + r, -s], [root + r * notch, 0], [root + r, s], [root + r * 0.6, s * 0.8], [root - 0.02 * length, 0.08 * width]])
}

export interface SceneOptions {
  width: number
  height: number
  /** Centre of the fish as a fraction of the picture. */
  cx?: number
  cy?: number
  /** Direction the snout points, in degrees (0 = to the right). */
  angle?: number
  /** Body length (snout to tail root) as a fraction of the picture's width. */
  bodyLength?: number
  /** Seen in a mirror (or photographed through glass from the other side). */
  mirror?: boolean
  /** Seed for the pond floor behind the fish. */
  backgroundSeed?: number
}

const SCALE_SIZE = 0.028

/** Rows of overlapping scale edges over the body's box, as one path (one stroke is far cheaper to render than a tiled pattern). */
function scaleArcs(length: number, bodyWidth: number, scale: number) {
  const parts: string[] = []
  const rx = (scale / 2).toFixed(1)
  const ry = (scale * 0.6).toFixed(1)
  for (let row = 0, y = -bodyWidth / 2; y <= bodyWidth / 2; row++, y += scale * 0.8) {
    for (let x = 0.12 * length + (row % 2) * scale / 2; x < length; x += scale) {
      parts.push(`M${x.toFixed(1)},${y.toFixed(1)}a${rx},${ry} 0 0 0 ${scale.toFixed(1)},0`)
    }
  }
  return parts.join('')
}

/** The fish as an SVG picture (a pond floor, a shadow, the fish from above). */
export function fishSvg(pattern: FishPattern, options: SceneOptions) {
  const { width: W, height: H } = options
  const length = (options.bodyLength ?? 0.62) * W
  const bodyWidth = OUTLINE[pattern.build].width * length
  const random = seededRandom(options.backgroundSeed ?? pattern.seed ^ 0x5bd1e995)
  const colour = (c: TradeColour) => TRADE_COLOURS[c]
  const body = bodyPath(pattern.build, length)
  const scale = SCALE_SIZE * length
  // The fish is drawn with its centre (half-way along the body) at the origin.
  const centre = length * 0.55
  const angle = options.angle ?? 0
  const place = `translate(${(options.cx ?? 0.5) * W} ${(options.cy ?? 0.5) * H}) rotate(${angle}) scale(1 ${options.mirror ? -1 : 1}) translate(${-centre} 0)`

  const stones = Array.from({ length: 14 }, () => {
    const r = between(random, 0.03, 0.09) * W
    const grey = Math.floor(between(random, 40, 80))
    return `<ellipse cx="${(random() * W).toFixed(0)}" cy="${(random() * H).toFixed(0)}" rx="${r.toFixed(0)}" ry="${(r * between(random, 0.5, 0.9)).toFixed(0)}" fill="rgb(${grey},${grey + 14},${grey + 6})" opacity="0.55"/>`
  }).join('')

  const pectoral = (side: 1 | -1) => finPath([0.2 * length, side * bodyWidth * 0.42], side * 1.05, 0.2 * length * (pattern.build === 'round' ? 0.8 : 1), 0.1 * length)
  const pelvic = (side: 1 | -1) => finPath([0.5 * length, side * bodyWidth * 0.3], side * 0.8, 0.09 * length, 0.05 * length)
  const finFill = colour(pattern.fin)
  const finTip = pattern.finTips ? colour(pattern.finTips) : finFill
  const fins = [1, -1].map(side => `
    <path d="${pectoral(side as 1 | -1)}" fill="url(#fin)" stroke="${finTip}" stroke-opacity="0.5" stroke-width="${(0.004 * length).toFixed(1)}"/>
    <path d="${pelvic(side as 1 | -1)}" fill="url(#fin)" opacity="0.85"/>`).join('')
  const scaleTexture = pattern.doitsu
    ? Array.from({ length: 9 }, (_, i) => `<circle cx="${((0.28 + i * 0.065) * length).toFixed(1)}" cy="0" r="${(scale * 0.9).toFixed(1)}" fill="none" stroke="#000" stroke-opacity="0.35" stroke-width="${(scale * 0.12).toFixed(1)}"/>`).join('')
    : `<path d="${scaleArcs(length, bodyWidth, scale)}" fill="none" stroke="${pattern.net ? '#0c1a26' : '#000'}" stroke-opacity="${pattern.net ? 0.5 : 0.16}" stroke-width="${(scale * (pattern.net ? 0.14 : 0.07)).toFixed(2)}"/>`
  const eyes = [1, -1].map(side => `<ellipse cx="${(0.075 * length).toFixed(1)}" cy="${(side * halfWidth(pattern.build, 0.075) * bodyWidth * 0.46).toFixed(1)}" rx="${(0.014 * length).toFixed(1)}" ry="${(0.01 * length).toFixed(1)}" fill="#161616" opacity="0.8"/>`).join('')
  const wen = pattern.wen ? `<ellipse cx="${(0.1 * length).toFixed(1)}" cy="0" rx="${(0.1 * length).toFixed(1)}" ry="${(bodyWidth * 0.36).toFixed(1)}" fill="url(#wen)"/>` : ''
  const patches = pattern.patches.map(p => `<path d="${patchPath(p, pattern.build, length)}" fill="${colour(p.colour)}"/>`).join('')

  return `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}">
  <defs>
    <linearGradient id="water" x1="0" y1="0" x2="1" y2="1"><stop offset="0" stop-color="#27433f"/><stop offset="1" stop-color="#1a302f"/></linearGradient>
    <linearGradient id="fin" x1="0" y1="0" x2="1" y2="0"><stop offset="0" stop-color="${finFill}" stop-opacity="0.85"/><stop offset="1" stop-color="${finTip}" stop-opacity="0.6"/></linearGradient>
    <radialGradient id="wen" cx="0.5" cy="0.5" r="0.5"><stop offset="0" stop-color="#f6a04a"/><stop offset="1" stop-color="#e2761c" stop-opacity="0.4"/></radialGradient>
    <linearGradient id="sheen" x1="0" y1="0" x2="0" y2="1"><stop offset="0" stop-color="#000" stop-opacity="0.25"/><stop offset="0.5" stop-color="#fff" stop-opacity="${pattern.metallic ? 0.45 : 0.12}"/><stop offset="1" stop-color="#000" stop-opacity="0.25"/></linearGradient>
    <clipPath id="body"><path d="${body}"/></clipPath>
  </defs>
  <rect width="${W}" height="${H}" fill="url(#water)"/>
  ${stones}
  <g transform="${place}">
    <g transform="translate(${(0.03 * length).toFixed(1)} ${(0.04 * length).toFixed(1)})" opacity="0.3"><path d="${body}" fill="#000"/></g>
    <path d="${tailPath(pattern.tail, length, bodyWidth)}" fill="url(#fin)" stroke="${finTip}" stroke-opacity="0.4" stroke-width="${(0.004 * length).toFixed(1)}"/>
    ${fins}
    <path d="${body}" fill="${colour(pattern.base)}"/>
    <g clip-path="url(#body)">${patches}${scaleTexture}
      <rect x="0" y="${(-bodyWidth / 2).toFixed(1)}" width="${length}" height="${bodyWidth.toFixed(1)}" fill="url(#sheen)"/>
      <rect x="${(0.38 * length).toFixed(1)}" y="${(-0.018 * length).toFixed(1)}" width="${(0.36 * length).toFixed(1)}" height="${(0.036 * length).toFixed(1)}" rx="${(0.018 * length).toFixed(1)}" fill="#000" opacity="0.18"/>
    </g>
    ${wen}${eyes}
  </g>
</svg>`
}

export interface PhotoConditions {
  /** Multiplies brightness: below 1 is darker (overcast, shade), above 1 brighter. */
  brightness?: number
  /** Colour temperature shift: below 0 cooler (bluer), above 0 warmer (yellower), about −1..1. */
  warmth?: number
  /** Gaussian blur sigma in pixels (out of focus, moving fish). */
  blur?: number
  /** JPEG quality, 1..100. */
  quality?: number
  /** Water ripple over the fish: 0 none, 1 a breeze on the surface (a sine displacement of the pixels). */
  ripple?: number
}

/** Shifts each pixel along two crossing sine waves, as a rippled surface bends the view of the fish below. */
async function rippled(image: sharp.Sharp, strength: number, seed: number) {
  const { data, info } = await image.removeAlpha().raw().toBuffer({ resolveWithObject: true })
  const { width, height, channels } = info
  const out = Buffer.alloc(data.length)
  const amplitude = strength * width * 0.008
  const random = seededRandom(seed)
  const waves = Array.from({ length: 3 }, () => ({ length: width * (0.05 + random() * 0.08), phase: random() * Math.PI * 2, angle: random() * Math.PI }))
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      let dx = 0
      let dy = 0
      for (const w of waves) {
        const t = (x * Math.cos(w.angle) + y * Math.sin(w.angle)) / w.length * Math.PI * 2 + w.phase
        dx += Math.sin(t) * amplitude * Math.cos(w.angle)
        dy += Math.sin(t) * amplitude * Math.sin(w.angle)
      }
      const sx = Math.min(width - 1, Math.max(0, Math.round(x + dx)))
      const sy = Math.min(height - 1, Math.max(0, Math.round(y + dy)))
      data.copy(out, (y * width + x) * channels, (sy * width + sx) * channels, (sy * width + sx) * channels + channels)
    }
  }
  return sharp(out, { raw: { width, height, channels } })
}

/** Renders the scene to a JPEG, as a phone would save it. */
export async function renderFishJpeg(pattern: FishPattern, scene: SceneOptions, conditions: PhotoConditions = {}) {
  let image = sharp(Buffer.from(fishSvg(pattern, scene)), { density: 72 })
  if (conditions.ripple) image = await rippled(image, conditions.ripple, pattern.seed + 101)
  const warmth = conditions.warmth ?? 0
  const brightness = conditions.brightness ?? 1
  if (warmth !== 0 || brightness !== 1) {
    // Per-channel gain: a warm light lifts red and lowers blue; a cool one the other way round.
    image = image.linear([brightness * (1 + 0.18 * warmth), brightness * (1 + 0.03 * warmth), brightness * (1 - 0.2 * warmth)], [0, 0, 0])
  }
  if (conditions.blur && conditions.blur >= 0.3) image = image.blur(conditions.blur)
  return image.jpeg({ quality: conditions.quality ?? 88, mozjpeg: false }).toBuffer()
}
