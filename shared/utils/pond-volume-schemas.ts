// A pond's volume as measured: the shape, the unit the tape read in, and the readings as typed.
// The litres are always worked out from these by pondVolumeLitres, on both sides, never taken on trust.
import { z } from 'zod'
import { pondVolumeLitres, type PondDimensions } from './pond-volume'

export const POND_LENGTH_UNITS = ['m', 'ft'] as const
export type PondLengthUnit = typeof POND_LENGTH_UNITS[number]
export const VOLUME_DISPLAY_UNITS = ['L', 'us gal', 'imp gal'] as const
export type VolumeDisplayUnit = typeof VOLUME_DISPLAY_UNITS[number]

// NIST SP 811 / Handbook 44: 1 ft = 0.3048 m exactly.
const METRES_PER_UNIT: Record<PondLengthUnit, number> = { m: 1, ft: 0.3048 }

// 200 m (656 ft) across is a lake; 10 m deep is far beyond any garden pond.
const span = (what: string) => z.number(`Enter the ${what} as a number`).positive(`The ${what} must be more than 0`).max(656, `The ${what} is too large for a pond`)
const depth = z.number('Enter the depth as a number').positive('The depth must be more than 0').max(33, 'The depth is too large for a pond')
const readings = (what: string, one: z.ZodNumber) => z.array(one, `Give at least one ${what}`).min(1, `Give at least one ${what}`).max(20, 'At most 20 readings')

const common = {
  unit: z.enum(POND_LENGTH_UNITS, 'Choose metres or feet'),
  shownIn: z.enum(VOLUME_DISPLAY_UNITS, 'Choose litres, US gallons or imperial gallons').default('L'),
}

export const pondVolumeMeasurementSchema = z.discriminatedUnion('shape', [
  z.strictObject({ shape: z.literal('rectangle'), ...common, length: span('length'), width: span('width'), depth }),
  z.strictObject({ shape: z.literal('circle'), ...common, diameter: span('diameter'), depth }),
  z.strictObject({ shape: z.literal('oval'), ...common, length: span('length'), width: span('width'), depth }),
  z.strictObject({ shape: z.literal('irregular'), ...common, lengths: readings('length', span('length')), widths: readings('width', span('width')), depths: readings('depth', depth) }),
], { error: 'Choose rectangle, circle, oval or irregular' })

export type PondVolumeMeasurement = z.output<typeof pondVolumeMeasurementSchema>

export const pondVolumeUpdateSchema = z.strictObject({
  measurement: pondVolumeMeasurementSchema,
})

/** The measurement in metres, as pondVolumeLitres takes it. */
export function dimensionsInMetres(m: PondVolumeMeasurement): PondDimensions {
  const f = METRES_PER_UNIT[m.unit]
  switch (m.shape) {
    case 'rectangle': return { shape: 'rectangle', lengthM: m.length * f, widthM: m.width * f, depthM: m.depth * f }
    case 'oval': return { shape: 'oval', lengthM: m.length * f, widthM: m.width * f, depthM: m.depth * f }
    case 'circle': return { shape: 'circle', diameterM: m.diameter * f, depthM: m.depth * f }
    case 'irregular': return { shape: 'irregular', lengthsM: m.lengths.map(v => v * f), widthsM: m.widths.map(v => v * f), depthsM: m.depths.map(v => v * f) }
  }
}

/** Litres from the measurement, or null when a reading makes no sense. */
export function measuredVolumeLitres(m: PondVolumeMeasurement): number | null {
  return pondVolumeLitres(dimensionsInMetres(m))
}

// NIST Handbook 44: 1 US gallon = 3.785411784 L, 1 imperial gallon = 4.54609 L (exact).
const LITRES_PER: Record<VolumeDisplayUnit, number> = { 'L': 1, 'us gal': 3.785411784, 'imp gal': 4.54609 }

export function litresTo(litres: number, unit: VolumeDisplayUnit): number {
  return litres / LITRES_PER[unit]
}

export const VOLUME_UNIT_LABELS: Record<VolumeDisplayUnit, string> = { 'L': 'litres', 'us gal': 'US gallons', 'imp gal': 'imperial gallons' }
