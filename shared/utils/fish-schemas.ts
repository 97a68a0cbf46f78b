import { z } from 'zod'
import { FISH_SEXES, FISH_SPECIES, FISH_STATUSES } from './enums'
import { parseMicrochip } from './microchip'

export const SCIENTIFIC_NAMES = { koi: 'Cyprinus carpio', goldfish: 'Carassius auratus' } as const

const isoDate = z.iso.date('Use the form YYYY-MM-DD')
  .refine(d => d <= new Date().toISOString().slice(0, 10), 'Cannot be in the future')

const microchip = z.string().trim().max(40, 'At most 15 digits').transform((text, ctx) => {
  if (text === '') return null
  const parsed = parseMicrochip(text)
  if (!parsed.ok) {
    ctx.addIssue({ code: 'custom', message: parsed.reason })
    return z.NEVER
  }
  return parsed.normalized
})

const thisYear = () => new Date().getFullYear()

const fishFields = {
  name: z.string().trim().min(1, 'Give the fish a name').max(80, 'At most 80 characters'),
  species: z.enum(FISH_SPECIES, 'Choose koi, goldfish or other'),
  scientificName: z.string().trim().max(120, 'At most 120 characters').optional(),
  variety: z.string().trim().max(80, 'At most 80 characters').optional(),
  sex: z.enum(FISH_SEXES, 'Choose unknown, male or female').optional(),
  hatchYear: z.number('Enter a year').int('Enter a whole year').min(1900, 'Too early').refine(y => y <= thisYear(), 'Cannot be in the future').nullable().optional(),
  estimatedAgeYears: z.number('Enter a number of years').min(0, 'Cannot be negative').max(100, 'At most 100 years').optional(),
  acquiredOn: isoDate.nullable().optional(),
  acquiredFrom: z.string().trim().max(160, 'At most 160 characters').optional(),
  microchip: microchip.nullable().optional(),
  features: z.string().trim().max(2000, 'At most 2000 characters').optional(),
}

function checkAgeAndName(value: { species?: string, scientificName?: string, hatchYear?: number | null, estimatedAgeYears?: number }, ctx: z.RefinementCtx) {
  if (value.hatchYear != null && value.estimatedAgeYears != null) {
    ctx.addIssue({ code: 'custom', path: ['estimatedAgeYears'], message: 'Give a hatch year or an estimated age, not both' })
  }
  if (value.species === 'other' && !value.scientificName) {
    ctx.addIssue({ code: 'custom', path: ['scientificName'], message: 'Give the scientific name for other species' })
  }
}

export const fishCreateSchema = z.strictObject(fishFields).superRefine(checkAgeAndName)

export const fishUpdateSchema = z.strictObject({
  ...fishFields,
  status: z.enum(FISH_STATUSES, 'Choose alive, deceased or rehomed'),
}).partial().extend({
  version: z.number('The version you edited is required').int().min(1),
}).superRefine(checkAgeAndName)

export type FishCreateInput = z.infer<typeof fishCreateSchema>
export type FishUpdateInput = z.infer<typeof fishUpdateSchema>

export const fishListQuerySchema = z.strictObject({
  q: z.string().trim().max(100, 'At most 100 characters').optional(),
  sort: z.enum(['name', 'age', 'status', 'condition']).optional(),
  dir: z.enum(['asc', 'desc']).optional(),
  status: z.enum([...FISH_STATUSES, 'all']).optional(),
})

export const fishIdParams = z.object({ fishId: z.uuid('Not a valid id') })

/** The growth series: a chart-sized sample by default, every measurement with `points=all`. */
export const growthQuerySchema = z.strictObject({
  points: z.enum(['chart', 'all'], 'Either chart or all').optional(),
  markers: z.enum(['chart', 'all'], 'Either chart or all').optional(),
})

/** Turns the form's "estimated age" into the stored hatch year, marked as an estimate. */
export function hatchYearFrom(input: { hatchYear?: number | null, estimatedAgeYears?: number }, now = new Date()) {
  if (input.estimatedAgeYears != null) return { hatchYear: now.getFullYear() - Math.round(input.estimatedAgeYears), hatchYearEstimated: true }
  if (input.hatchYear !== undefined) return { hatchYear: input.hatchYear, hatchYearEstimated: false }
  return {}
}

export function ageInYears(hatchYear: number | null, now = new Date()): number | null {
  return hatchYear == null ? null : Math.max(0, now.getFullYear() - hatchYear)
}
