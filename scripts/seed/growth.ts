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
  /** Growth coefficient per year (von Bertalanffy K). */
  rate: number
  /** Fulton's K at the reference length; the fish's build. */
  condition: number
  referenceLengthCm: number
  lengthType: 'total' | 'fork' | 'standard'
}

// Slightly below 3, as length–weight fits of carp and goldfish usually are.
const EXPONENT = 2.95

/**
 * Koi and goldfish spawn in late spring, once the water holds about 18–20 °C (common practice):
 * every demo fish hatches on 1 June of its hatch year, as a decimal year.
 */
export function hatchDate(hatchYear: number) {
  return hatchYear + 151 / 365
}

/** A date as a decimal year (2024-07-02 → about 2024.5). */
export function decimalYear(date: Date) {
  const start = Date.UTC(date.getUTCFullYear(), 0, 1)
  const end = Date.UTC(date.getUTCFullYear() + 1, 0, 1)
  return date.getUTCFullYear() + (date.getTime() - start) / (end - start)
}

// Seasonally oscillating von Bertalanffy growth (Somers 1988, Fishbyte 6(1):8-11; recalled from
// memory): L(t) = L∞ (1 − exp(−K (t − t0) − S(t) + S(t0))), S(t) = (C K / 2π) sin(2π (t − ts)).
// C = 1 stops growth at the winter point (early February, ts + ½), so fish grow in the warm months
// only, fastest in early August (ts). t0 about eight weeks after hatching stands in for the slow
// larval weeks. With L∞ 72 cm and K 0.3 a pond koi measures about 7 cm in its first October,
// 24 cm after its second summer, 36 cm after the third, 57 cm at five and 66 cm at eight: the figures
// koi keepers quote for garden ponds (common practice, not a published table). Fancy goldfish, by
// standard length, reach about 8 cm after two summers and 12–13 cm as adults (also common practice).
const WINTER_STOP = 1
const FASTEST_GROWTH = 0.6
const LARVAL_LAG_YEARS = 0.15

function seasonal(model: GrowthModel, t: number) {
  return (WINTER_STOP * model.rate / (2 * Math.PI)) * Math.sin(2 * Math.PI * (t - FASTEST_GROWTH))
}

/** Length in cm at decimal year `t` of a fish hatched at decimal year `hatched`. */
export function lengthAt(model: GrowthModel, hatched: number, t: number) {
  const t0 = hatched + LARVAL_LAG_YEARS
  if (t <= t0) return 0.6
  const grown = model.maxLengthCm * (1 - Math.exp(-model.rate * (t - t0) - seasonal(model, t) + seasonal(model, t0)))
  return Math.max(0.6, grown)
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
