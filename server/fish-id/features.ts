// What "Which fish is this?" keeps of a photo taken from above: the fish cut from the background, turned
// to lie along its body axis, then (a) ORB keypoints and (b) the layout of its colour patches on a grid
// over the body. Explicit relative imports only: the seed, the benchmark and the worker thread use it.
import type { OpenCv } from './opencv'

/** Bump when the features change: stored features of another version are computed again. */
export const FEATURES_VERSION = 1

/** Cells of the body grid: along the body (snout to tail) and across it (left to right side). */
export const GRID_ALONG = 16
export const GRID_ACROSS = 6
/** The trade's colour classes: sumi (black), white, hi (red), orange, ki (yellow), blue-grey, other. */
export const COLOUR_CLASSES = ['black', 'white', 'red', 'orange', 'yellow', 'blue', 'other'] as const
const CLASSES = COLOUR_CLASSES.length

/** Body length, in pixels, of the turned fish that keypoints are found on. */
const NORMAL_LENGTH = 320
const ORB_FEATURES = 400

export interface RgbImage {
  data: Uint8Array
  width: number
  height: number
}

export interface KeypointSet {
  /** x, y pairs in the turned fish's frame. */
  points: Float32Array
  /** 32 bytes per keypoint (ORB's binary descriptor). */
  descriptors: Uint8Array
}

export interface FishFeatures {
  version: number
  keypoints: KeypointSet
  /** Keypoints of the fish seen in a mirror; kept for query photos only. */
  mirrored?: KeypointSet
  /** Per grid cell, the share of each colour class (GRID_ALONG × GRID_ACROSS × classes). */
  layout: Float32Array
  /** Per grid cell, how much of it is fish (0..1). */
  coverage: Float32Array
  /** The fish runs off the edge of the picture: only part of it is seen. */
  partial: boolean
}

// ---- colour: grey-world balance and brightness, then the trade's colour classes ----

/**
 * Grey-world white balance (Buchsbaum 1980, J. Franklin Inst. 310:1-26): each channel is scaled so the
 * picture averages grey, which removes most of a colour cast from sunlight, shade or a phone's guess.
 * Then one gain so the brightest 1 % sits near white, which undoes an under- or over-exposed picture.
 */
function balancedColours(image: RgbImage): Float32Array {
  const { data, width, height } = image
  const n = width * height
  const sums = [0, 0, 0]
  for (let i = 0; i < n; i++) {
    sums[0]! += data[i * 3]!
    sums[1]! += data[i * 3 + 1]!
    sums[2]! += data[i * 3 + 2]!
  }
  const grey = (sums[0]! + sums[1]! + sums[2]!) / 3
  const gains = sums.map(s => (s > 0 ? grey / s : 1))
  const out = new Float32Array(n * 3)
  const luminance = new Uint32Array(256)
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < 3; c++) out[i * 3 + c] = Math.min(1, (data[i * 3 + c]! / 255) * gains[c]!)
    const y = 0.299 * out[i * 3]! + 0.587 * out[i * 3 + 1]! + 0.114 * out[i * 3 + 2]!
    luminance[Math.min(255, Math.round(y * 255))]!++
  }
  let seen = 0
  let top = 255
  for (let v = 255; v >= 0; v--) {
    seen += luminance[v]!
    if (seen >= n * 0.01) {
      top = v
      break
    }
  }
  const gain = Math.min(3, Math.max(0.6, (0.92 * 255) / Math.max(top, 1)))
  for (let i = 0; i < out.length; i++) out[i] = Math.min(1, out[i]! * gain)
  return out
}

/** The colour class of one balanced pixel, by hue, saturation and value (thresholds: our own, tuned on generated pictures). */
function colourClass(r: number, g: number, b: number): number {
  const max = Math.max(r, g, b)
  const min = Math.min(r, g, b)
  const value = max
  const saturation = max > 0 ? (max - min) / max : 0
  if (value < 0.24) return 0
  if (saturation < 0.2 && value > 0.62) return 1
  let hue = 0
  if (max !== min) {
    if (max === r) hue = ((g - b) / (max - min)) % 6
    else if (max === g) hue = (b - r) / (max - min) + 2
    else hue = (r - g) / (max - min) + 4
    hue *= 60
    if (hue < 0) hue += 360
  }
  if (saturation < 0.28) return value < 0.4 ? 0 : 5
  if (hue >= 330 || hue < 18) return 2
  if (hue < 38) return value < 0.55 && saturation < 0.6 ? 6 : 3
  if (hue < 70) return 4
  if (hue >= 170 && hue < 270) return 5
  return 6
}

// ---- segmentation: the fish against the pond ----

/** k-means on the colours of the picture's border: the pond floor and water, in a few shades. */
function backgroundCentres(colours: Float32Array, width: number, height: number, k = 4): number[][] {
  const band = Math.max(2, Math.round(Math.min(width, height) * 0.03))
  const samples: number[][] = []
  const step = Math.max(1, Math.floor((2 * (width + height) * band) / 3000))
  let counter = 0
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (x >= band && x < width - band && y >= band && y < height - band) continue
      if (counter++ % step) continue
      const i = (y * width + x) * 3
      samples.push([colours[i]!, colours[i + 1]!, colours[i + 2]!])
    }
  }
  let centres = Array.from({ length: k }, (_, j) => [...samples[Math.floor((j + 0.5) * samples.length / k)]!])
  let shares = centres.map(() => 1 / k)
  for (let iteration = 0; iteration < 8; iteration++) {
    const sums = centres.map(() => [0, 0, 0, 0])
    for (const s of samples) {
      let best = 0
      let bestDistance = Infinity
      centres.forEach((c, j) => {
        const d = (s[0]! - c[0]!) ** 2 + (s[1]! - c[1]!) ** 2 + (s[2]! - c[2]!) ** 2
        if (d < bestDistance) {
          bestDistance = d
          best = j
        }
      })
      const sum = sums[best]!
      sum[0]! += s[0]!
      sum[1]! += s[1]!
      sum[2]! += s[2]!
      sum[3]!++
    }
    centres = sums.map((s, j) => (s[3]! ? [s[0]! / s[3]!, s[1]! / s[3]!, s[2]! / s[3]!] : centres[j]!))
    shares = sums.map(s => s[3]! / samples.length)
  }
  // A fish running off the edge puts its own colours on the border: a shade that covers only a
  // small stretch of the border is the fish, not the pond.
  const kept = centres.filter((_, j) => shares[j]! >= 0.12)
  return kept.length ? kept : centres
}

/** Otsu's threshold (Otsu 1979, IEEE Trans. SMC 9:62-66): the cut that best separates two classes of a histogram. */
function otsu(histogram: Uint32Array, total: number) {
  let sum = 0
  for (let i = 0; i < histogram.length; i++) sum += i * histogram[i]!
  let sumBackground = 0
  let weightBackground = 0
  let best = 0
  let threshold = 0
  for (let i = 0; i < histogram.length; i++) {
    weightBackground += histogram[i]!
    if (!weightBackground) continue
    const weightForeground = total - weightBackground
    if (!weightForeground) break
    sumBackground += i * histogram[i]!
    const meanBackground = sumBackground / weightBackground
    const meanForeground = (sum - sumBackground) / weightForeground
    const between = weightBackground * weightForeground * (meanBackground - meanForeground) ** 2
    if (between > best) {
      best = between
      threshold = i
    }
  }
  return threshold
}

/**
 * The fish's silhouette: each pixel's colour distance to the nearest background shade, cut at Otsu's
 * threshold, cleaned with a morphological closing and opening, the largest connected region kept and
 * its holes filled (a black patch on a fish over dark water is still fish).
 */
function segment(cv: OpenCv, colours: Float32Array, width: number, height: number) {
  const centres = backgroundCentres(colours, width, height)
  const n = width * height
  const distance = new Uint8Array(n)
  const histogram = new Uint32Array(256)
  for (let i = 0; i < n; i++) {
    let best = Infinity
    for (const c of centres) {
      const d = (colours[i * 3]! - c[0]!) ** 2 + (colours[i * 3 + 1]! - c[1]!) ** 2 + (colours[i * 3 + 2]! - c[2]!) ** 2
      if (d < best) best = d
    }
    const value = Math.min(255, Math.round(Math.sqrt(best) * 255))
    distance[i] = value
    histogram[value]!++
  }
  const threshold = Math.max(otsu(histogram, n), 18)
  const raw = new cv.Mat(height, width, cv.CV_8UC1)
  const rawData = raw.data as Uint8Array
  for (let i = 0; i < n; i++) rawData[i] = distance[i]! > threshold ? 255 : 0
  const size = Math.max(3, Math.round(Math.min(width, height) * 0.012)) | 1
  const kernel = cv.getStructuringElement(cv.MORPH_ELLIPSE, new cv.Size(size, size))
  cv.morphologyEx(raw, raw, cv.MORPH_CLOSE, kernel)
  cv.morphologyEx(raw, raw, cv.MORPH_OPEN, kernel)
  const contours = new cv.MatVector()
  const hierarchy = new cv.Mat()
  cv.findContours(raw, contours, hierarchy, cv.RETR_EXTERNAL, cv.CHAIN_APPROX_SIMPLE)
  let largest = -1
  let largestArea = 0
  for (let i = 0; i < contours.size(); i++) {
    const contour = contours.get(i)
    const area = cv.contourArea(contour)
    contour.delete()
    if (area > largestArea) {
      largestArea = area
      largest = i
    }
  }
  const mask = cv.Mat.zeros(height, width, cv.CV_8UC1)
  if (largest >= 0) cv.drawContours(mask, contours, largest, new cv.Scalar(255), -1)
  raw.delete()
  kernel.delete()
  contours.delete()
  hierarchy.delete()
  return { mask, area: largestArea }
}

// ---- orientation along the body axis ----

/**
 * The body axis from the silhouette's image moments (Hu 1962, IRE Trans. Inf. Theory 8:179-187):
 * θ = ½ atan2(2 μ11, μ20 − μ02) from the central second moments, turned to lie horizontal, cut to
 * the fish and scaled to a fixed body length.
 */
function turnToAxis(cv: OpenCv, rgb: OpenCv, mask: OpenCv) {
  const m = cv.moments(mask, true)
  const cx = m.m10 / m.m00
  const cy = m.m01 / m.m00
  const angle = 0.5 * Math.atan2(2 * m.mu11, m.mu20 - m.mu02)
  const diagonal = Math.ceil(Math.hypot(mask.cols, mask.rows))
  const rotation = cv.getRotationMatrix2D(new cv.Point(cx, cy), (angle * 180) / Math.PI, 1)
  // Move the centroid to the middle of a canvas the turned picture always fits in.
  rotation.doublePtr(0, 2)[0] += diagonal / 2 - cx
  rotation.doublePtr(1, 2)[0] += diagonal / 2 - cy
  const turnedRgb = new cv.Mat()
  const turnedMask = new cv.Mat()
  const size = new cv.Size(diagonal, diagonal)
  cv.warpAffine(rgb, turnedRgb, rotation, size, cv.INTER_LINEAR, cv.BORDER_CONSTANT, new cv.Scalar(0, 0, 0, 0))
  cv.warpAffine(mask, turnedMask, rotation, size, cv.INTER_NEAREST, cv.BORDER_CONSTANT, new cv.Scalar(0))
  rotation.delete()
  const box = cv.boundingRect(turnedMask)
  const rgbCrop = turnedRgb.roi(box)
  const maskCrop = turnedMask.roi(box)
  const scale = NORMAL_LENGTH / Math.max(box.width, 1)
  const normalSize = new cv.Size(NORMAL_LENGTH, Math.max(8, Math.round(box.height * scale)))
  const rgbOut = new cv.Mat()
  const maskOut = new cv.Mat()
  cv.resize(rgbCrop, rgbOut, normalSize, 0, 0, cv.INTER_AREA)
  cv.resize(maskCrop, maskOut, normalSize, 0, 0, cv.INTER_NEAREST)
  for (const mat of [turnedRgb, turnedMask, rgbCrop, maskCrop]) mat.delete()
  return { rgb: rgbOut, mask: maskOut }
}

/**
 * Puts the head on the left: the narrow root of the tail (the caudal peduncle) is the thinnest part of
 * the silhouette between the body and the tail fin, so the end with the thinner stretch is the tail.
 */
function headFirst(cv: OpenCv, rgb: OpenCv, mask: OpenCv) {
  const data = mask.data as Uint8Array
  const widths: number[] = []
  for (let x = 0; x < mask.cols; x++) {
    let count = 0
    for (let y = 0; y < mask.rows; y++) if (data[y * mask.cols + x]) count++
    widths.push(count)
  }
  const thinnest = (from: number, to: number) => Math.min(...widths.slice(Math.floor(from * widths.length), Math.ceil(to * widths.length)))
  if (thinnest(0.1, 0.35) < thinnest(0.65, 0.9)) {
    cv.flip(rgb, rgb, 1)
    cv.flip(mask, mask, 1)
  }
}

// ---- the two descriptions ----

function colourLayout(rgb: OpenCv, mask: OpenCv) {
  const layout = new Float32Array(GRID_ALONG * GRID_ACROSS * CLASSES)
  const counts = new Float32Array(GRID_ALONG * GRID_ACROSS)
  const areas = new Float32Array(GRID_ALONG * GRID_ACROSS)
  const { cols, rows } = mask
  const maskData = mask.data as Uint8Array
  const pixels = rgb.data as Uint8Array
  for (let x = 0; x < cols; x++) {
    let top = -1
    let bottom = -1
    for (let y = 0; y < rows; y++) {
      if (maskData[y * cols + x]) {
        if (top < 0) top = y
        bottom = y
      }
    }
    if (top < 0) continue
    const along = Math.min(GRID_ALONG - 1, Math.floor((x / cols) * GRID_ALONG))
    const span = bottom - top + 1
    for (let y = top; y <= bottom; y++) {
      const across = Math.min(GRID_ACROSS - 1, Math.floor(((y - top) / span) * GRID_ACROSS))
      const cell = along * GRID_ACROSS + across
      areas[cell]!++
      const i = y * cols + x
      if (!maskData[i]) continue
      const c = colourClass(pixels[i * 3]! / 255, pixels[i * 3 + 1]! / 255, pixels[i * 3 + 2]! / 255)
      layout[cell * CLASSES + c]!++
      counts[cell]!++
    }
  }
  const coverage = new Float32Array(GRID_ALONG * GRID_ACROSS)
  for (let cell = 0; cell < counts.length; cell++) {
    coverage[cell] = areas[cell]! ? counts[cell]! / areas[cell]! : 0
    if (counts[cell]! > 0) for (let c = 0; c < CLASSES; c++) layout[cell * CLASSES + c]! /= counts[cell]!
  }
  return { layout, coverage }
}

/** ORB keypoints and binary descriptors (Rublee, Rabaud, Konolige & Bradski 2011, ICCV) on the turned fish. */
function orbKeypoints(cv: OpenCv, rgb: OpenCv, mask: OpenCv): KeypointSet {
  const grey = new cv.Mat()
  cv.cvtColor(rgb, grey, cv.COLOR_RGB2GRAY)
  const orb = new cv.ORB(ORB_FEATURES)
  const keypoints = new cv.KeyPointVector()
  const descriptors = new cv.Mat()
  orb.detectAndCompute(grey, mask, keypoints, descriptors)
  const n = keypoints.size()
  const points = new Float32Array(n * 2)
  for (let i = 0; i < n; i++) {
    const k = keypoints.get(i)
    points[i * 2] = k.pt.x
    points[i * 2 + 1] = k.pt.y
  }
  const bytes = descriptors.rows ? new Uint8Array(descriptors.data) : new Uint8Array(0)
  for (const mat of [grey, orb, keypoints, descriptors]) mat.delete()
  return { points, descriptors: bytes }
}

export class NoFishFound extends Error {}

/** Features of one picture (RGB, any size; about 480 px on the long side is plenty). */
export function extractFeatures(cv: OpenCv, image: RgbImage, options: { withMirror?: boolean } = {}): FishFeatures {
  const colours = balancedColours(image)
  const { mask, area } = segment(cv, colours, image.width, image.height)
  const total = image.width * image.height
  if (area < total * 0.004 || area > total * 0.9) {
    mask.delete()
    throw new NoFishFound('No fish stands out from the background in this picture.')
  }
  const maskData = mask.data as Uint8Array
  const { width, height } = image
  const edge = 2
  let partial = false
  for (let x = 0; x < width && !partial; x++) partial = Boolean(maskData[edge * width + x] || maskData[(height - 1 - edge) * width + x])
  for (let y = 0; y < height && !partial; y++) partial = Boolean(maskData[y * width + edge] || maskData[y * width + width - 1 - edge])
  const balanced = new cv.Mat(image.height, image.width, cv.CV_8UC3)
  const balancedData = balanced.data as Uint8Array
  for (let i = 0; i < colours.length; i++) balancedData[i] = Math.round(colours[i]! * 255)
  const turned = turnToAxis(cv, balanced, mask)
  balanced.delete()
  mask.delete()
  try {
    headFirst(cv, turned.rgb, turned.mask)
    const { layout, coverage } = colourLayout(turned.rgb, turned.mask)
    const keypoints = orbKeypoints(cv, turned.rgb, turned.mask)
    let mirrored: KeypointSet | undefined
    if (options.withMirror) {
      cv.flip(turned.rgb, turned.rgb, 0)
      cv.flip(turned.mask, turned.mask, 0)
      mirrored = orbKeypoints(cv, turned.rgb, turned.mask)
    }
    return { version: FEATURES_VERSION, keypoints, mirrored, layout, coverage, partial }
  }
  finally {
    turned.rgb.delete()
    turned.mask.delete()
  }
}

// ---- stored form: one binary value per photo ----

const HEADER_BYTES = 16

/** Packs features into bytes for the database (little-endian: version, flags, keypoint count, then the arrays). */
export function packFeatures(features: FishFeatures): Buffer {
  const n = features.keypoints.points.length / 2
  const size = HEADER_BYTES + n * 8 + n * 32 + features.layout.length * 4 + features.coverage.length * 4
  const out = Buffer.alloc(size)
  out.writeUInt32LE(features.version, 0)
  out.writeUInt32LE(features.partial ? 1 : 0, 4)
  out.writeUInt32LE(n, 8)
  out.writeUInt32LE(features.layout.length, 12)
  let at = HEADER_BYTES
  for (const value of features.keypoints.points) {
    out.writeFloatLE(value, at)
    at += 4
  }
  out.set(features.keypoints.descriptors, at)
  at += n * 32
  for (const value of features.layout) {
    out.writeFloatLE(value, at)
    at += 4
  }
  for (const value of features.coverage) {
    out.writeFloatLE(value, at)
    at += 4
  }
  return out
}

export function unpackFeatures(bytes: Uint8Array): FishFeatures {
  const data = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength)
  const n = data.readUInt32LE(8)
  const cells = data.readUInt32LE(12)
  let at = HEADER_BYTES
  const points = new Float32Array(n * 2)
  for (let i = 0; i < points.length; i++, at += 4) points[i] = data.readFloatLE(at)
  const descriptors = new Uint8Array(data.subarray(at, at + n * 32))
  at += n * 32
  const layout = new Float32Array(cells)
  for (let i = 0; i < cells; i++, at += 4) layout[i] = data.readFloatLE(at)
  const coverage = new Float32Array(cells / COLOUR_CLASSES.length)
  for (let i = 0; i < coverage.length; i++, at += 4) coverage[i] = data.readFloatLE(at)
  return { version: data.readUInt32LE(0), partial: data.readUInt32LE(4) === 1, keypoints: { points, descriptors }, layout, coverage }
}
