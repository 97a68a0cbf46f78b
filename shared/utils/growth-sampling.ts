import { createLTTB } from 'downsample'

/** At most this many points per series (weight, length, condition) go to the chart; more adds nothing a screen shows. */
export const GROWTH_CHART_POINTS_PER_SERIES = 150

const lttb = createLTTB<{ index: number, t: number, v: number }>({ x: 't', y: 'v' })
/** What the sampler reads of a measurement; the route's points carry more, and keep it. */
export interface GrowthSample {
  at: string
  /** `at` in ms since 1970, when the caller has it already (saves parsing each date again). */
  time?: number
  weightG: number | null
  lengthCm: number | null
  conditionK: number | null
}

const SERIES: ((p: GrowthSample) => number | null)[] = [p => p.weightG, p => p.lengthCm, p => p.conditionK]

/**
 * The measurements a chart needs to keep its shape: Largest-Triangle-Three-Buckets (Steinarsson 2013,
 * "Downsampling Time Series for Visual Representation", University of Iceland) picks the point of each
 * time bucket that spans the largest triangle with its neighbours, so peaks and drops survive. It runs on
 * weight, length and condition factor separately; the union of the chosen measurements is kept in time order.
 */
export function sampleGrowthPoints<Point extends GrowthSample>(points: Point[], perSeries = GROWTH_CHART_POINTS_PER_SERIES): Point[] {
  if (points.length <= perSeries) return points
  const keep = new Set<number>()
  for (const valueOf of SERIES) {
    const series = points.flatMap((p, index) => {
      const v = valueOf(p)
      return v == null ? [] : [{ index, t: p.time ?? Date.parse(p.at), v }]
    })
    for (const chosen of series.length <= perSeries ? series : Array.from(lttb(series, perSeries))) keep.add(chosen.index)
    // downsample 1.4.0 can lose the last point to a rounding of its bucket edges; the method keeps it.
    if (series.length) keep.add(series.at(-1)!.index)
  }
  return points.filter((_, index) => keep.has(index))
}
