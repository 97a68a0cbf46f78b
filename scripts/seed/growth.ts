// Invented growth for the demo fish: von Bertalanffy length with age, weight from a length–weight
// curve with each fish's own condition, heavier after summer feeding and lighter after winter.
// A seeded random source keeps every seed run identical.

export function seededRandom(seed: number) {
  let state = seed >>> 0
  // mulberry32: small, fast and good enough for invented data.
  return () => {
    state = (state + 0x6D2B79F5) >>> 0
    let t = state
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

export interface GrowthModel {
  /** Asymptotic length in cm (von Bertalanffy L∞). */
  maxLengthCm: number
  /** Growth coefficient per year (von Bertalanffy k). */
  rate: number
  /** Fulton's K at the reference length; the fish's build. */
  condition: number
  referenceLengthCm: number
  lengthType: 'total' | 'fork' | 'standard'
}

// Slightly below 3, as length–weight fits of carp and goldfish usually are.
const EXPONENT = 2.95

export function lengthAt(model: GrowthModel, ageYears: number) {
  return model.maxLengthCm * (1 - Math.exp(-model.rate * (ageYears + 0.3)))
}

export function weightAt(model: GrowthModel, lengthCm: number, conditionFactor = 1) {
  const scale = (model.condition / 100) * model.referenceLengthCm ** (3 - EXPONENT)
  return scale * lengthCm ** EXPONENT * conditionFactor
}

/** Spring weighings follow the winter fast; autumn ones the summer's feeding. */
export function seasonFactor(month: number) {
  if (month >= 3 && month <= 5) return 0.96
  if (month >= 8 && month <= 10) return 1.04
  return 1
}

export function round(value: number, step: number) {
  return Math.round(value / step) * step
}
