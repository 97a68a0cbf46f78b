// "Which fish is this?": the answer's shape and how a score reads in words, for the route and the page.

export const IDENTIFY_MAX_CANDIDATES = 5

export type Similarity = 'strong' | 'possible' | 'weak'

export interface IdentifyCandidate {
  fishId: string
  name: string
  /** 0..1: how alike the fish's best-matching reference photo is. */
  score: number
  referencePhotoId: string
  variety: string
  latestWeightG: number | null
  similarity: Similarity
}

export interface IdentifyResult {
  candidates: IdentifyCandidate[]
  /** Usable reference photos (ready, taken from above) of the pond's living fish. */
  referenceCount: number
  /** Why there are no candidates, when there are none. */
  reason?: string
}

/** A score in words for the person confirming; thresholds tuned on the generated benchmark set (scripts/bench/which-fish.ts). */
export function similarityInWords(score: number): Similarity {
  if (score >= 0.6) return 'strong'
  if (score >= 0.35) return 'possible'
  return 'weak'
}
