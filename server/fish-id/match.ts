// Ranks a pond's fish for a new photo: first by the layout of colour patches on the body grid (cheap,
// every reference photo), then the closest references by ORB keypoints checked for one consistent
// geometry with RANSAC. Explicit relative imports only (the worker, the seed and the benchmark use it).
import { COLOUR_CLASSES, GRID_ACROSS, GRID_ALONG, type FishFeatures, type KeypointSet } from './features'
import type { OpenCv } from './opencv'

const CLASSES = COLOUR_CLASSES.length

export interface Reference {
  photoId: string
  fishId: string
  features: FishFeatures
}

export interface RankedFish {
  fishId: string
  /** 0..1: how alike the best reference photo of this fish is. */
  score: number
  referencePhotoId: string
  /** The two parts of the score, for the benchmark and for tuning. */
  colour: number
  inliers: number
}

/** References compared by keypoints after the colour layout has ranked them all. */
const KEYPOINT_SHORTLIST = 16
/** Lowe's ratio test (Lowe 2004, IJCV 60:91-110): keep a match only if clearly better than the runner-up. */
const RATIO = 0.8
/** RANSAC reprojection error in pixels of the 320 px turned fish (Fischler & Bolles 1981, CACM 24:381-395). */
const RANSAC_THRESHOLD = 6
const MIN_MATCHES = 8
const CONFIDENT_INLIERS = 20

// ---- (b) colour-pattern layout on the body grid ----

type Flip = { along: boolean, across: boolean }
const FLIPS: Flip[] = [
  { along: false, across: false },
  // A mirror image (or the fish seen through glass from the other side).
  { along: false, across: true },
  // The head-first guess went the wrong way: the same fish read from the tail.
  { along: true, across: true },
  { along: true, across: false },
]

// A partial view covers only part of the body: the query's grid is laid over a stretch of the reference's.
const FULL_VIEW = [{ offset: 0, span: 1 }]
const PARTIAL_VIEWS = [1, 0.85, 0.7, 0.55, 0.4].flatMap(span => Array.from({ length: Math.round((1 - span) / 0.075) + 1 }, (_, i) => ({ offset: Math.min(1 - span, i * 0.075), span })))

function layoutSimilarity(query: FishFeatures, reference: FishFeatures, flip: Flip, offset: number, span: number) {
  let weighted = 0
  let weights = 0
  for (let a = 0; a < GRID_ALONG; a++) {
    const along = flip.along ? GRID_ALONG - 1 - a : a
    const referenceAlong = Math.min(GRID_ALONG - 1, Math.floor((offset + span * ((along + 0.5) / GRID_ALONG)) * GRID_ALONG))
    for (let c = 0; c < GRID_ACROSS; c++) {
      const across = flip.across ? GRID_ACROSS - 1 - c : c
      const q = a * GRID_ACROSS + c
      const r = referenceAlong * GRID_ACROSS + across
      const weight = Math.min(query.coverage[q]!, reference.coverage[r]!)
      if (weight < 0.15) continue
      let overlap = 0
      for (let k = 0; k < CLASSES; k++) overlap += Math.min(query.layout[q * CLASSES + k]!, reference.layout[r * CLASSES + k]!)
      weighted += weight * overlap
      weights += weight
    }
  }
  // Too little body in common to say anything.
  return weights < GRID_ALONG * GRID_ACROSS * 0.12 ? 0 : weighted / weights
}

/** Histogram intersection (Swain & Ballard 1991, IJCV 7:11-32) of the colour classes, cell by cell, best over flips and stretches. */
export function colourSimilarity(query: FishFeatures, reference: FishFeatures) {
  let best = 0
  for (const flip of FLIPS) {
    for (const { offset, span } of query.partial ? PARTIAL_VIEWS : FULL_VIEW) {
      best = Math.max(best, layoutSimilarity(query, reference, flip, offset, span))
    }
  }
  return best
}

// ---- (a) keypoints with geometric verification ----

function descriptorMat(cv: OpenCv, set: KeypointSet) {
  const rows = set.descriptors.length / 32
  const mat = new cv.Mat(rows, 32, cv.CV_8UC1)
  ;(mat.data as Uint8Array).set(set.descriptors)
  return mat
}

/** Matches that pass the ratio test and agree on one homography found by RANSAC: their count. */
function verifiedMatches(cv: OpenCv, matcher: OpenCv, query: KeypointSet, queryDescriptors: OpenCv, reference: KeypointSet, referenceDescriptors: OpenCv) {
  if (query.points.length < MIN_MATCHES * 2 || reference.points.length < MIN_MATCHES * 2) return 0
  const pairs = new cv.DMatchVectorVector()
  matcher.knnMatch(queryDescriptors, referenceDescriptors, pairs, 2)
  const from: number[] = []
  const to: number[] = []
  for (let i = 0; i < pairs.size(); i++) {
    const pair = pairs.get(i)
    if (pair.size() === 2) {
      const best = pair.get(0)
      const second = pair.get(1)
      if (best.distance < RATIO * second.distance) {
        from.push(query.points[best.queryIdx * 2]!, query.points[best.queryIdx * 2 + 1]!)
        to.push(reference.points[best.trainIdx * 2]!, reference.points[best.trainIdx * 2 + 1]!)
      }
    }
    pair.delete()
  }
  pairs.delete()
  if (from.length / 2 < MIN_MATCHES) return 0
  const source = cv.matFromArray(from.length / 2, 1, cv.CV_32FC2, from)
  const target = cv.matFromArray(to.length / 2, 1, cv.CV_32FC2, to)
  const inlierMask = new cv.Mat()
  const homography = cv.findHomography(source, target, cv.RANSAC, RANSAC_THRESHOLD, inlierMask)
  const inliers = homography.empty() ? 0 : cv.countNonZero(inlierMask)
  for (const mat of [source, target, inlierMask, homography]) mat.delete()
  return inliers
}

// ---- together ----

/** How the two parts make one 0..1 score (weights and ranges tuned on the generated benchmark set). */
export function combinedScore(colour: number, inliers: number) {
  const colourPart = Math.min(1, Math.max(0, (colour - 0.55) / 0.4))
  const keypointPart = Math.min(1, Math.max(0, (inliers - 6) / 24))
  return 0.45 * colourPart + 0.55 * keypointPart
}

export function rankFish(cv: OpenCv, query: FishFeatures, references: Reference[], limit = 5): RankedFish[] {
  const byColour = references.map(reference => ({ reference, colour: colourSimilarity(query, reference.features), inliers: 0 }))
    .sort((a, b) => b.colour - a.colour)
  const shortlist = byColour.slice(0, KEYPOINT_SHORTLIST)
  const matcher = new cv.BFMatcher(cv.NORM_HAMMING, false)
  const queryMats = [query.keypoints, ...(query.mirrored ? [query.mirrored] : [])].map(set => ({ set, mat: descriptorMat(cv, set) }))
  try {
    for (const candidate of shortlist) {
      const referenceSet = candidate.reference.features.keypoints
      const referenceMat = descriptorMat(cv, referenceSet)
      for (const q of queryMats) {
        // The mirror image is tried only when the photo as taken did not already agree well.
        if (candidate.inliers >= CONFIDENT_INLIERS) break
        candidate.inliers = Math.max(candidate.inliers, verifiedMatches(cv, matcher, q.set, q.mat, referenceSet, referenceMat))
      }
      referenceMat.delete()
    }
  }
  finally {
    for (const q of queryMats) q.mat.delete()
    matcher.delete()
  }
  const bestPerFish = new Map<string, RankedFish>()
  for (const { reference, colour, inliers } of byColour) {
    const score = combinedScore(colour, inliers)
    const current = bestPerFish.get(reference.fishId)
    if (!current || score > current.score) bestPerFish.set(reference.fishId, { fishId: reference.fishId, score, referencePhotoId: reference.photoId, colour, inliers })
  }
  return [...bestPerFish.values()].sort((a, b) => b.score - a.score).slice(0, limit)
}
