// Pond volume from field measurements in metres, answered in litres (1 m³ = 1000 L).
// Formulas are common practice from extension services, e.g. Colorado State University Extension
// fact sheet 6.400 "Chemical Treatment of Ponds". They estimate: sloped sides and shelves make a
// real pond hold less, which matters most when the volume sets a treatment amount.

const LITRES_PER_CUBIC_METRE = 1000

function isDimension(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value) && value > 0
}

function average(values: number | readonly number[]): number | null {
  const list = typeof values === 'number' ? [values] : values
  if (!Array.isArray(list) || list.length === 0 || !list.every(isDimension)) return null
  return list.reduce((sum, v) => sum + v, 0) / list.length
}

/** Rectangle: length × width × depth. */
export function rectanglePondLitres(lengthM: number, widthM: number, depthM: number): number | null {
  if (!isDimension(lengthM) || !isDimension(widthM) || !isDimension(depthM)) return null
  return lengthM * widthM * depthM * LITRES_PER_CUBIC_METRE
}

/** Circle: π · r² · depth, from the diameter (easier to measure across a pond than a radius). */
export function circlePondLitres(diameterM: number, depthM: number): number | null {
  if (!isDimension(diameterM) || !isDimension(depthM)) return null
  const radius = diameterM / 2
  return Math.PI * radius * radius * depthM * LITRES_PER_CUBIC_METRE
}

/** Oval (ellipse): π/4 · length · width · depth, length and width being the longest and widest spans. */
export function ovalPondLitres(lengthM: number, widthM: number, depthM: number): number | null {
  if (!isDimension(lengthM) || !isDimension(widthM) || !isDimension(depthM)) return null
  return (Math.PI / 4) * lengthM * widthM * depthM * LITRES_PER_CUBIC_METRE
}

/** Irregular: average length × average width × average depth, each from one or more readings. */
export function irregularPondLitres(
  lengthsM: number | readonly number[],
  widthsM: number | readonly number[],
  depthsM: number | readonly number[],
): number | null {
  const length = average(lengthsM)
  const width = average(widthsM)
  const depth = average(depthsM)
  if (length === null || width === null || depth === null) return null
  return length * width * depth * LITRES_PER_CUBIC_METRE
}

export const POND_SHAPES = ['rectangle', 'circle', 'oval', 'irregular'] as const
export type PondShape = typeof POND_SHAPES[number]

export type PondDimensions
  = | { shape: 'rectangle', lengthM: number, widthM: number, depthM: number }
    | { shape: 'circle', diameterM: number, depthM: number }
    | { shape: 'oval', lengthM: number, widthM: number, depthM: number }
    | { shape: 'irregular', lengthsM: number | number[], widthsM: number | number[], depthsM: number | number[] }

/** One entry point for a form that lets the keeper pick the shape. */
export function pondVolumeLitres(dimensions: PondDimensions): number | null {
  switch (dimensions?.shape) {
    case 'rectangle': return rectanglePondLitres(dimensions.lengthM, dimensions.widthM, dimensions.depthM)
    case 'circle': return circlePondLitres(dimensions.diameterM, dimensions.depthM)
    case 'oval': return ovalPondLitres(dimensions.lengthM, dimensions.widthM, dimensions.depthM)
    case 'irregular': return irregularPondLitres(dimensions.lengthsM, dimensions.widthsM, dimensions.depthsM)
    default: return null
  }
}
