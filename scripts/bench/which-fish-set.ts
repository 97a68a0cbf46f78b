// The labelled picture set of the "which fish is this?" benchmark: fish of our own drawn by the seed's
// pattern generator, each photographed five times as references and again under harder conditions.
// Generated pictures, not photographs of real fish.
import { seededRandom } from '../seed/growth'
import { fishPattern, renderFishJpeg, type FishPattern, type PhotoConditions, type SceneOptions } from '../seed/fish-patterns'

const WIDTH = 640
const HEIGHT = 480

const VARIETIES: ['koi' | 'goldfish', string][] = [
  ['koi', 'Kohaku'], ['koi', 'Sanke'], ['koi', 'Showa'], ['koi', 'Tancho Kohaku'], ['koi', 'Ki Utsuri'], ['koi', 'Shiro Utsuri'],
  ['koi', 'Kumonryu'], ['koi', 'Shusui'], ['koi', 'Asagi'], ['koi', 'Goshiki'], ['goldfish', 'Ryukin'], ['goldfish', 'Shubunkin'],
  ['goldfish', 'Oranda'], ['goldfish', 'Comet'],
]

export interface BenchFish {
  id: string
  pattern: FishPattern
  /** The fish it was made to resemble (same variety, patches moved a little). */
  lookAlikeOf?: string
}

/** A second fish of the same variety whose patches sit a little elsewhere and are a little other in size. */
function lookAlike(pattern: FishPattern, seed: number): FishPattern {
  const random = seededRandom(seed)
  return {
    ...pattern,
    seed,
    patches: pattern.patches.map(p => ({
      ...p,
      u: p.u + (random() - 0.5) * 0.12,
      v: p.v + (random() - 0.5) * 0.4,
      ru: p.ru * (0.8 + random() * 0.4),
      rv: p.rv * (0.8 + random() * 0.4),
      wobble: p.wobble.map(w => w * (0.85 + random() * 0.3)),
    })),
  }
}

/** `count` fish: about a third of them in look-alike pairs. */
export function benchFish(count: number): BenchFish[] {
  const fish: BenchFish[] = []
  const pairs = Math.max(1, Math.floor(count / 6))
  for (let i = 0; fish.length < count; i++) {
    const [species, variety] = VARIETIES[i % VARIETIES.length]!
    const pattern = fishPattern(1000 + i * 7919, species, variety)
    fish.push({ id: `fish-${fish.length + 1}`, pattern })
    if (i < pairs && fish.length < count) fish.push({ id: `fish-${fish.length + 1}`, pattern: lookAlike(pattern, 50_000 + i), lookAlikeOf: fish.at(-1)!.id })
  }
  return fish
}

export interface Shot {
  scene: SceneOptions
  conditions: PhotoConditions
}

type Random = () => number
const around = (random: Random, centre: number, spread: number) => centre + (random() - 0.5) * 2 * spread

function baseScene(fish: BenchFish, random: Random): SceneOptions {
  return {
    width: WIDTH, height: HEIGHT, angle: random() * 360,
    bodyLength: (fish.pattern.build === 'round' ? 0.42 : 0.55) * around(random, 1, 0.08),
    cx: around(random, 0.5, 0.04), cy: around(random, 0.5, 0.04), backgroundSeed: Math.floor(random() * 1e9),
  }
}

/** Reference photos: from above, any direction, ordinary light. */
export function referenceShots(fish: BenchFish, count: number): Shot[] {
  const random = seededRandom(fish.pattern.seed + 1)
  return Array.from({ length: count }, () => ({
    scene: baseScene(fish, random),
    conditions: { brightness: around(random, 1, 0.08), warmth: around(random, 0, 0.15), quality: 85 },
  }))
}

export const CONDITIONS = ['rotation', 'scale', 'crop', 'lighting', 'colour temperature', 'blur', 'JPEG quality', 'water ripple', 'partial view'] as const
export type Condition = typeof CONDITIONS[number]

/** One query photo per condition: that condition pushed hard, everything else ordinary. */
export function queryShot(fish: BenchFish, condition: Condition): Shot {
  const random = seededRandom(fish.pattern.seed + 7 + CONDITIONS.indexOf(condition) * 131)
  const scene = baseScene(fish, random)
  const conditions: PhotoConditions = { quality: 85 }
  const length = scene.bodyLength!
  switch (condition) {
    case 'rotation':
      scene.angle = random() * 360
      break
    case 'scale':
      scene.bodyLength = length * (random() < 0.5 ? 0.55 : 1.3)
      break
    case 'crop':
      // Cropped close around the fish: drawn larger, nothing of the fish cut off.
      scene.bodyLength = length * 1.15
      scene.angle = around(random, 0, 15) + (random() < 0.5 ? 180 : 0)
      break
    case 'lighting':
      conditions.brightness = random() < 0.5 ? 0.55 : 1.35
      break
    case 'colour temperature':
      conditions.warmth = random() < 0.5 ? -0.8 : 0.8
      break
    case 'blur':
      conditions.blur = 2.5
      break
    case 'JPEG quality':
      conditions.quality = 15
      break
    case 'water ripple':
      conditions.ripple = 1
      break
    case 'partial view': {
      // A quarter to a third of the body out of the frame, head or tail end.
      scene.angle = around(random, 0, 10) + (random() < 0.5 ? 180 : 0)
      scene.bodyLength = length * 1.25
      const shift = (random() < 0.5 ? -1 : 1) * around(random, 0.36, 0.04)
      scene.cx = 0.5 + shift
      break
    }
  }
  return { scene, conditions }
}

export function renderShot(fish: BenchFish, shot: Shot) {
  return renderFishJpeg(fish.pattern, shot.scene, shot.conditions)
}

/** The hard case of the README's test: rotated, cut close and darker, all at once. */
export function rotatedCroppedDarker(fish: BenchFish): Shot {
  const random = seededRandom(fish.pattern.seed + 99)
  const scene = baseScene(fish, random)
  scene.angle = (scene.angle ?? 0) + 137
  scene.bodyLength = scene.bodyLength! * 1.15
  return { scene, conditions: { brightness: 0.65, quality: 80 } }
}
