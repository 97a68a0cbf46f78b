// Body condition and growth of an individual fish: condition factors, length–weight fits,
// standard and relative weight, growth rate, and weight-change alerts.
// Scalar functions answer null for input that cannot be a real measurement instead of throwing,
// so a half-filled form or an old record with a missing length shows "no value" rather than crashing.

function isPositiveNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value) && value > 0
}

/**
 * Fulton's condition factor K = 100 · W / L³ (W in g, L in cm).
 * Source: Fulton 1904; Nash, Valencia & Geffen 2006, Fisheries 31(5):236-238.
 * Store which length was measured alongside: K from fork length reads higher than from total length.
 */
export function fultonK(weightG: number, lengthCm: number): number | null {
  if (!isPositiveNumber(weightG) || !isPositiveNumber(lengthCm)) return null
  return (100 * weightG) / lengthCm ** 3
}

/** Weight predicted by W = a · L^b (units are whatever a and b were fitted in). */
export function predictedWeight(lengthCm: number, a: number, b: number): number | null {
  if (!isPositiveNumber(lengthCm) || !isPositiveNumber(a) || !Number.isFinite(b)) return null
  return a * lengthCm ** b
}

/** Le Cren's relative condition Kn = W / (a · L^b). Source: Le Cren 1951, J. Anim. Ecol. 20:201-219. */
export function relativeCondition(weightG: number, lengthCm: number, a: number, b: number): number | null {
  if (!isPositiveNumber(weightG)) return null
  const expected = predictedWeight(lengthCm, a, b)
  return expected === null ? null : weightG / expected
}

export interface LengthWeightPoint {
  lengthCm: number
  weightG: number
}

export interface LengthWeightFit {
  a: number
  b: number
  /** Coefficient of determination of the log–log regression. */
  r2: number
  /** Number of points the fit used. */
  n: number
}

/**
 * Least-squares fit of log10 W = log10 a + b · log10 L, the usual way W = a · L^b is estimated
 * (Le Cren 1951; Froese 2006, J. Appl. Ichthyol. 22:241-253, who expects 2.5 < b < 3.5).
 * Points that are not finite and positive are left out; fewer than 3 usable points, or points that
 * all share one length, give null because the slope is then undetermined or meaningless.
 */
export function fitLengthWeight(points: readonly LengthWeightPoint[]): LengthWeightFit | null {
  const usable = points.filter(p => p && isPositiveNumber(p.lengthCm) && isPositiveNumber(p.weightG))
  const n = usable.length
  if (n < 3) return null
  if (usable.every(p => p.lengthCm === usable[0]!.lengthCm)) return null

  const xs = usable.map(p => Math.log10(p.lengthCm))
  const ys = usable.map(p => Math.log10(p.weightG))
  const meanX = xs.reduce((sum, x) => sum + x, 0) / n
  const meanY = ys.reduce((sum, y) => sum + y, 0) / n
  let sxx = 0
  let sxy = 0
  let syy = 0
  for (let i = 0; i < n; i++) {
    const dx = xs[i]! - meanX
    const dy = ys[i]! - meanY
    sxx += dx * dx
    sxy += dx * dy
    syy += dy * dy
  }
  if (!(sxx > 0)) return null

  const b = sxy / sxx
  const a = 10 ** (meanY - b * meanX)
  // All weights equal leaves no variance to explain; the flat line then fits every point exactly.
  const r2 = syy > 0 ? (sxy * sxy) / (sxx * syy) : 1
  return { a, b, r2, n }
}

/** Froese 2006 (J. Appl. Ichthyol. 22:241-253): b of a length–weight relationship usually lies between 2.5 and 3.5. */
export const EXPECTED_B_RANGE = { low: 2.5, high: 3.5 } as const

/** Whether a fitted b falls outside Froese's 2.5–3.5, which usually means mixed-up data rather than odd fish. */
export function isUnusualB(b: number): boolean {
  return !(b >= EXPECTED_B_RANGE.low && b <= EXPECTED_B_RANGE.high)
}

export interface DatedLengthWeightPoint extends LengthWeightPoint {
  at: string
}

/**
 * The pond's length–weight fit with one point per fish, its latest weighing with a length: pooling every
 * weighing would let a fish weighed often outweigh the rest and would fit one fish's growth, not the pond.
 * Returns the fit (or null, as fitLengthWeight) and whether b is outside 2.5–3.5 (Froese 2006).
 */
export function fitLatestPerFish(fish: readonly { points: readonly DatedLengthWeightPoint[] }[]): (LengthWeightFit & { bOutsideRange: boolean }) | null {
  const latest = fish.flatMap((one) => {
    const usable = one.points.filter(p => isPositiveNumber(p.lengthCm) && isPositiveNumber(p.weightG) && Number.isFinite(Date.parse(p.at)))
    const last = usable.reduce<DatedLengthWeightPoint | undefined>((best, p) => (!best || Date.parse(p.at) >= Date.parse(best.at) ? p : best), undefined)
    return last ? [last] : []
  })
  const fit = fitLengthWeight(latest)
  return fit ? { ...fit, bOutsideRange: isUnusualB(fit.b) } : null
}

/** Bister et al. 2000 (N. Am. J. Fish. Manage. 20:570-574), common carp, TL in mm, Ws in g. */
const COMMON_CARP_STANDARD_WEIGHT = {
  intercept: -4.639,
  slope: 2.920,
  // The paper gives the minimum length the equation applies from; we found no published maximum,
  // so none is applied.
  minTotalLengthMm: 200,
} as const

const COMMON_CARP_NAMES = new Set(['koi', 'common carp', 'cyprinus carpio'])

function standardWeightEquationFor(species: string) {
  if (typeof species !== 'string') return null
  const name = species.trim().replace(/\s+/g, ' ').toLowerCase()
  // Koi are ornamental common carp; no standard weight is published for goldfish.
  return COMMON_CARP_NAMES.has(name) ? COMMON_CARP_STANDARD_WEIGHT : null
}

/** Whether a standard-weight equation exists for this species (koi, common carp, Cyprinus carpio). */
export function hasStandardWeight(species: string): boolean {
  return standardWeightEquationFor(species) !== null
}

/**
 * Standard weight Ws (g) at a total length in mm: log10 Ws = −4.639 + 2.920 · log10 TL.
 * Null for species without an equation and for lengths under 200 mm, where it does not apply.
 */
export function standardWeight(species: string, totalLengthMm: number): number | null {
  const equation = standardWeightEquationFor(species)
  if (!equation || !isPositiveNumber(totalLengthMm)) return null
  if (totalLengthMm < equation.minTotalLengthMm) return null
  return 10 ** (equation.intercept + equation.slope * Math.log10(totalLengthMm))
}

/** Relative weight Wr = 100 · W / Ws (Bister et al. 2000); 100 means the standard weight exactly. */
export function relativeWeight(species: string, weightG: number, totalLengthMm: number): number | null {
  if (!isPositiveNumber(weightG)) return null
  const ws = standardWeight(species, totalLengthMm)
  return ws === null ? null : (100 * weightG) / ws
}

/**
 * Specific growth rate in % body weight per day: 100 · (ln W2 − ln W1) / days
 * (Hopkins 1992, J. World Aquaculture Soc. 23:173-179). Negative when the fish lost weight.
 */
export function specificGrowthRate(weight1G: number, weight2G: number, days: number): number | null {
  if (!isPositiveNumber(weight1G) || !isPositiveNumber(weight2G) || !isPositiveNumber(days)) return null
  return (100 * (Math.log(weight2G) - Math.log(weight1G))) / days
}

export interface WeightMeasurement {
  date: string | Date
  weightG: number
}

export interface WeightChangeAlertOptions {
  /** Whether the fish is expected to gain weight. Overrides the age rule when given. */
  growing?: boolean
  /** Used when `growing` is not given: a fish under `growingUntilAgeYears` at the window's end is growing. */
  hatchYear?: number
  /** Common practice: fish under 5 years old are treated as still growing. */
  growingUntilAgeYears?: number
  /** Default WEIGHT_LOSS_RULE.lossPercent (10 %, common practice). */
  lossPercent?: number
  /** Default WEIGHT_LOSS_RULE.lossWindowDays (90 days, common practice). */
  lossWindowDays?: number
  /** Common practice: a growing fish that has not gained in a year is worth a look. */
  noGainDays?: number
}

export interface WeightChangeAlert {
  kind: 'loss' | 'no_gain'
  /** The dates exactly as they were passed in, so callers can match them to their records. */
  from: string | Date
  to: string | Date
  fromWeightG: number
  toWeightG: number
  days: number
  /** 100 · (W_to − W_from) / W_from; negative for a loss. */
  changePercent: number
  message: string
}

/**
 * Common practice: a loss of 10 % or more within 90 days is worth a look. The one source of these numbers:
 * scripts/migrate.ts writes them into the weight_loss_rule row that the fish list's flag is computed from in SQL.
 */
export const WEIGHT_LOSS_RULE = { lossPercent: 10, lossWindowDays: 90 } as const

const DAY_MS = 86_400_000
// Guards the ≥ comparisons against binary rounding (a 10 % loss must count as 10 %). The SQL uses the same 1e-9.
const PERCENT_TOLERANCE = 1e-9

interface DatedWeight {
  original: string | Date
  time: number
  year: number
  weightG: number
}

function toTime(date: string | Date): number {
  const time = date instanceof Date ? date.getTime() : typeof date === 'string' ? Date.parse(date) : Number.NaN
  return Number.isFinite(time) ? time : Number.NaN
}

function formatGrams(weightG: number): string {
  return `${Number(weightG.toFixed(1))} g`
}

function makeAlert(kind: WeightChangeAlert['kind'], from: DatedWeight, to: DatedWeight): WeightChangeAlert {
  const changePercent = (100 * (to.weightG - from.weightG)) / from.weightG
  const days = Math.round((to.time - from.time) / DAY_MS)
  const weights = `${formatGrams(from.weightG)} → ${formatGrams(to.weightG)}`
  const message = kind === 'loss'
    ? `Weight fell ${Math.abs(changePercent).toFixed(1)} % in ${days} days (${weights}).`
    : `No weight gain in ${days} days (${weights}) in a fish expected to be growing.`
  return { kind, from: from.original, to: to.original, fromWeightG: from.weightG, toWeightG: to.weightG, days, changePercent, message }
}

// Overlapping windows describe one episode; keep the window with the largest fall.
function pushEpisode(alerts: WeightChangeAlert[], times: Map<WeightChangeAlert, [number, number]>, alert: WeightChangeAlert, span: [number, number]) {
  const last = alerts.at(-1)
  const lastSpan = last ? times.get(last) : undefined
  if (last && lastSpan && span[0] < lastSpan[1]) {
    if (alert.changePercent < last.changePercent) {
      alerts[alerts.length - 1] = alert
      times.set(alert, span)
    }
    return
  }
  alerts.push(alert)
  times.set(alert, span)
}

/**
 * Flags weight changes worth a look at the next visit:
 * - `loss`: a fall of at least `lossPercent` (10 %) from any weighing within the previous
 *   `lossWindowDays` (90 days);
 * - `no_gain`: in a growing fish, a weight no higher than the weighing closest to (but at least)
 *   `noGainDays` (365 days) earlier.
 * Thresholds are common practice, not a published standard; adjust them through the options.
 * Overlapping windows are one episode and reported once, by their largest fall. Entries with an
 * unreadable date or a weight that is not positive are ignored.
 */
export function weightChangeAlert(
  measurements: readonly WeightMeasurement[],
  options: WeightChangeAlertOptions = {},
): WeightChangeAlert[] {
  const lossPercent = options.lossPercent ?? WEIGHT_LOSS_RULE.lossPercent
  const lossWindowMs = (options.lossWindowDays ?? WEIGHT_LOSS_RULE.lossWindowDays) * DAY_MS
  const noGainMs = (options.noGainDays ?? 365) * DAY_MS
  const growingUntilAge = options.growingUntilAgeYears ?? 5

  const series: DatedWeight[] = (measurements ?? [])
    .map(m => ({ original: m?.date, time: toTime(m?.date), weightG: m?.weightG }))
    .filter((m): m is { original: string | Date, time: number, weightG: number } =>
      Number.isFinite(m.time) && isPositiveNumber(m.weightG))
    .map(m => ({ ...m, year: new Date(m.time).getUTCFullYear() }))
    .sort((x, y) => x.time - y.time)

  const isGrowingAt = (point: DatedWeight): boolean => {
    if (typeof options.growing === 'boolean') return options.growing
    if (typeof options.hatchYear === 'number' && Number.isFinite(options.hatchYear)) {
      return point.year - options.hatchYear < growingUntilAge
    }
    // Without an age or an explicit answer we cannot tell whether a flat weight is a concern.
    return false
  }

  const lossAlerts: WeightChangeAlert[] = []
  const lossSpans = new Map<WeightChangeAlert, [number, number]>()
  const noGainAlerts: WeightChangeAlert[] = []
  const noGainSpans = new Map<WeightChangeAlert, [number, number]>()

  for (let j = 1; j < series.length; j++) {
    const to = series[j]!

    let heaviest: DatedWeight | undefined
    for (let i = j - 1; i >= 0 && to.time - series[i]!.time <= lossWindowMs; i--) {
      const candidate = series[i]!
      if (candidate.time < to.time && (!heaviest || candidate.weightG > heaviest.weightG)) heaviest = candidate
    }
    // The alert (and its message) is made only for a fall big enough: most weighings are not one.
    if (heaviest && (100 * (to.weightG - heaviest.weightG)) / heaviest.weightG <= -lossPercent + PERCENT_TOLERANCE) {
      pushEpisode(lossAlerts, lossSpans, makeAlert('loss', heaviest, to), [heaviest.time, to.time])
    }

    if (isGrowingAt(to)) {
      let yearBefore: DatedWeight | undefined
      for (let i = j - 1; i >= 0; i--) {
        if (to.time - series[i]!.time >= noGainMs) {
          yearBefore = series[i]
          break
        }
      }
      if (yearBefore && to.weightG <= yearBefore.weightG) {
        pushEpisode(noGainAlerts, noGainSpans, makeAlert('no_gain', yearBefore, to), [yearBefore.time, to.time])
      }
    }
  }

  return [...lossAlerts, ...noGainAlerts].sort((x, y) => toTime(x.to) - toTime(y.to))
}
