// What a water test holds, checked by the form before sending and by the route on arrival.
// Values arrive in canonical units (°C, mg/L as N, dKH, dGH, ppt); the form converts what was typed.
import { z } from 'zod'
import { occurredAtSchema } from './timeline-schemas'
import { WATER_PARAMETERS, type MeasuredWaterParameter } from './water-targets'

// Impossible, not merely unusual: these are refused. Unusual values get a warning in the form instead.
const concentration = (what: string, max: number, unit: string) => z.number(`Enter the ${what} as a number`)
  .min(0, `The ${what} cannot be negative`)
  .max(max, `More than ${max} ${unit} is not a possible ${what} for a pond`)

export const waterReadingFields = {
  temperatureC: z.number('Enter the temperature as a number')
    .min(0, 'Below 0 °C the pond is ice: check the reading and the unit')
    .max(45, 'Above 45 °C is not a possible pond temperature: check the reading and the unit'),
  pH: z.number('Enter the pH as a number').min(0, 'pH runs from 0 to 14').max(14, 'pH runs from 0 to 14'),
  tanMgL: concentration('total ammonia', 100, 'mg/L'),
  nitriteNMgL: concentration('nitrite', 100, 'mg/L'),
  nitrateNMgL: concentration('nitrate', 500, 'mg/L'),
  khDKH: concentration('KH', 100, 'dKH'),
  ghDGH: concentration('GH', 100, 'dGH'),
  dissolvedOxygenMgL: concentration('dissolved oxygen', 50, 'mg/L'),
  salinityPpt: concentration('salinity', 60, 'ppt'),
} satisfies Record<MeasuredWaterParameter, z.ZodNumber>

const optionalReadings = Object.fromEntries(
  Object.entries(waterReadingFields).map(([key, schema]) => [key, schema.nullable().optional()]),
) as { [K in MeasuredWaterParameter]: z.ZodOptional<z.ZodNullable<typeof waterReadingFields[K]>> }

export const waterTestCreateSchema = z.strictObject({
  // A client-chosen id makes a retried send after a lost answer find the test it already wrote.
  id: z.uuid('Not a valid id').optional(),
  testedAt: occurredAtSchema,
  ...optionalReadings,
  notes: z.string('Enter text').trim().max(2000, 'At most 2000 characters').default(''),
}).refine(test => Object.keys(waterReadingFields).some(key => test[key as MeasuredWaterParameter] != null), {
  message: 'Enter at least one reading', path: ['_'],
})

export type WaterTestCreateInput = z.input<typeof waterTestCreateSchema>
export type WaterTestCreate = z.output<typeof waterTestCreateSchema>

export const waterTestListQuery = z.strictObject({
  limit: z.coerce.number('Enter a number').int('A whole number').min(1, 'At least 1').max(2000, 'At most 2000').default(500),
})

// Possible but unusual: the form asks "are you sure?" before sending these (the server accepts them).
const UNUSUAL: Partial<Record<MeasuredWaterParameter, { low?: number, high?: number }>> = {
  temperatureC: { high: 35 },
  pH: { low: 5, high: 10 },
  tanMgL: { high: 10 },
  nitriteNMgL: { high: 5 },
  nitrateNMgL: { high: 100 },
  khDKH: { high: 30 },
  ghDGH: { high: 40 },
  dissolvedOxygenMgL: { high: 20 },
  salinityPpt: { high: 15 },
}

/** Readings worth a second look before saving, with the message to show beside each. */
export function unusualReadings(test: Partial<Record<MeasuredWaterParameter, number | null | undefined>>): Partial<Record<MeasuredWaterParameter, string>> {
  const warnings: Partial<Record<MeasuredWaterParameter, string>> = {}
  for (const [key, range] of Object.entries(UNUSUAL) as [MeasuredWaterParameter, { low?: number, high?: number }][]) {
    const value = test[key]
    if (value == null) continue
    if ((range.low !== undefined && value < range.low) || (range.high !== undefined && value > range.high)) {
      warnings[key] = 'Unusual for a pond: check the reading and its unit before saving.'
    }
  }
  return warnings
}

const target = z.strictObject({
  low: z.number('Enter a number').min(0, 'Cannot be negative').max(1000, 'Too large').nullable(),
  high: z.number('Enter a number').min(0, 'Cannot be negative').max(1000, 'Too large').nullable(),
}).refine(t => t.low === null || t.high === null || t.low < t.high, { message: 'The low end must be below the high end', path: ['high'] })
  .refine(t => t.low !== null || t.high !== null, { message: 'Give a low end, a high end or both', path: ['low'] })

/** The pond's own ranges: a parameter set to null goes back to the default. */
export const pondWaterTargetsSchema = z.strictObject({
  targets: z.partialRecord(z.enum(WATER_PARAMETERS, 'Unknown parameter'), target.nullable()),
})

export type WaterTargetsUpdate = z.output<typeof pondWaterTargetsSchema>
