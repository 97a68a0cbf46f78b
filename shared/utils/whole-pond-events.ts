// Whole-pond treatments and events: what each kind holds, who may record it, and which amounts look
// wrong enough to ask before saving. One schema for the form and the route; the role rule for the
// treatments is the fish treatment rule of timeline-rules.ts, so the two can never disagree.
import { z } from 'zod'
import type { PondRole } from '../types'
import { bathAmountMg, saltForPondKg } from './doses'
import { occurredAtSchema } from './timeline-schemas'
import { writeDecision, type WriteDecision } from './timeline-rules'
import type { WHOLE_POND_EVENT_KINDS } from './enums'

export type WholePondEventKind = typeof WHOLE_POND_EVENT_KINDS[number]

export const WHOLE_POND_EVENT_LABELS: Record<WholePondEventKind, string> = {
  salt: 'Salt added to the pond',
  bath: 'Pond bath treatment',
  water_change: 'Water change',
  mortality: 'Losses in the pond',
}

/** Salt and pond baths are treatments of every fish in the pond. */
export function isPondTreatment(kind: WholePondEventKind) {
  return kind === 'salt' || kind === 'bath'
}

export const BATH_CONCENTRATION_UNITS = ['mg/L', 'g/L', 'mL/L'] as const
export const BATH_AMOUNT_UNITS = ['mg', 'g', 'kg', 'mL', 'L'] as const

const text = (max: number) => z.string('Enter text').trim().max(max, `At most ${max} characters`)
const required = (max: number, missing: string) => text(max).min(1, missing)
const positive = (what: string, max: number, unit: string) => z.number(`Enter the ${what} as a number`)
  .positive(`The ${what} must be more than 0`).max(max, `More than ${max} ${unit} is not a possible ${what}`)

// A keeper or owner records a pond treatment given on the instruction of one of the pond's vets, chosen by id
// (the fish treatment rule); the server writes that vet's name beside it.
const onInstruction = {
  instructedById: z.uuid('Choose one of the pond’s vets').optional(),
  instructedBy: text(120).optional(),
}

export const saltEventData = z.strictObject({
  // Salt for a pond is a few tenths of a percent; 3 % is a short dip, never a pond (common practice).
  percent: positive('salt level', 3, '%'),
  amountKg: positive('amount of salt', 100_000, 'kg'),
  product: text(160).default('Salt (sodium chloride)'),
  ...onInstruction,
  notes: text(4000).default(''),
})

export const bathEventData = z.strictObject({
  drug: required(160, 'Name the drug or product'),
  concentration: positive('concentration', 100_000, 'units'),
  concentrationUnit: z.enum(BATH_CONCENTRATION_UNITS, 'Choose mg/L, g/L or mL/L'),
  amount: positive('amount used', 10_000_000, 'units'),
  amountUnit: z.enum(BATH_AMOUNT_UNITS, 'Choose mg, g, kg, mL or L'),
  durationHours: positive('duration', 24 * 60, 'hours').optional(),
  ...onInstruction,
  notes: text(4000).default(''),
})

export const waterChangeEventData = z.strictObject({
  litresChanged: positive('water changed', 100_000_000, 'L'),
  notes: text(4000).default(''),
})

export const mortalityEventData = z.strictObject({
  count: z.number('Enter how many fish died').int('A whole number').min(1, 'At least 1').max(100_000, 'Too many for one pond'),
  cause: text(300).default(''),
  notes: text(4000).default(''),
})

export const WHOLE_POND_EVENT_DATA = {
  salt: saltEventData,
  bath: bathEventData,
  water_change: waterChangeEventData,
  mortality: mortalityEventData,
} as const

export type WholePondEventData<K extends WholePondEventKind = WholePondEventKind> = z.output<typeof WHOLE_POND_EVENT_DATA[K]>

const volume = z.number('Enter the pond volume in litres').positive('The volume must be more than 0').max(100_000_000, 'Too large for a pond')

const eventOf = <K extends WholePondEventKind, S extends z.ZodType>(kind: K, data: S) => z.strictObject({
  // A client-chosen id: a retried send after a lost answer finds what it already wrote.
  id: z.uuid('Not a valid id').optional(),
  kind: z.literal(kind),
  occurredAt: occurredAtSchema,
  // The water the amounts were worked out for; the route fills in the pond's own volume when absent.
  volumeLitres: volume.optional(),
  // Set after the person has seen the warnings and saves anyway.
  confirmUnusual: z.boolean('Yes or no').default(false),
  data,
})

export const pondEventCreateSchema = z.discriminatedUnion('kind', [
  eventOf('salt', saltEventData),
  eventOf('bath', bathEventData),
  eventOf('water_change', waterChangeEventData),
  eventOf('mortality', mortalityEventData),
], { error: 'Choose what happened to the pond' })

export type PondEventCreate = z.output<typeof pondEventCreateSchema>

export const pondEventIdParams = z.object({ pondId: z.uuid(), eventId: z.uuid() })
export const pondEventErrorSchema = z.strictObject({ reason: z.string('Say why').trim().min(3, 'Say why in a few words').max(500, 'At most 500 characters') })

/** Who may record a whole-pond event: treatments follow the fish treatment rule, the rest anyone of the pond. */
export function pondEventDecision(role: PondRole, kind: WholePondEventKind, data: Record<string, unknown>): WriteDecision {
  if (!isPondTreatment(kind)) return { allowed: true }
  return writeDecision(role, 'treatment', data)
}

const AMOUNT_TO_BASE: Record<typeof BATH_AMOUNT_UNITS[number], { base: 'mg' | 'mL', factor: number }> = {
  mg: { base: 'mg', factor: 1 }, g: { base: 'mg', factor: 1000 }, kg: { base: 'mg', factor: 1_000_000 },
  mL: { base: 'mL', factor: 1 }, L: { base: 'mL', factor: 1000 },
}
const CONCENTRATION_TO_BASE: Record<typeof BATH_CONCENTRATION_UNITS[number], { base: 'mg' | 'mL', factor: number }> = {
  'mg/L': { base: 'mg', factor: 1 }, 'g/L': { base: 'mg', factor: 1000 }, 'mL/L': { base: 'mL', factor: 1 },
}

/** What the concentration and volume work out to, in the unit the person used, or null when it cannot be compared. */
export function expectedAmount(kind: WholePondEventKind, data: Record<string, unknown>, volumeLitres: number | null | undefined): { value: number, unit: string } | null {
  if (!volumeLitres) return null
  if (kind === 'salt') {
    const kg = saltForPondKg(Number(data.percent), volumeLitres)
    return kg === null ? null : { value: kg, unit: 'kg' }
  }
  if (kind === 'bath') {
    const concentration = CONCENTRATION_TO_BASE[data.concentrationUnit as keyof typeof CONCENTRATION_TO_BASE]
    const amount = AMOUNT_TO_BASE[data.amountUnit as keyof typeof AMOUNT_TO_BASE]
    if (!concentration || !amount || concentration.base !== amount.base) return null
    const base = bathAmountMg(Number(data.concentration) * concentration.factor, volumeLitres)
    return base === null ? null : { value: base / amount.factor, unit: String(data.amountUnit) }
  }
  return null
}

const MISMATCH = 0.25
const round = (value: number) => Number(value.toPrecision(3))

/**
 * Possible but unusual: saved only after the person has seen these. An amount more than a quarter
 * away from what concentration × volume gives is more often a slip (a wrong unit, a wrong volume)
 * than a choice; salt above 1 % is far above what ponds are kept at (common practice).
 */
export function pondEventWarnings(kind: WholePondEventKind, data: Record<string, unknown>, volumeLitres: number | null | undefined): { field: string, message: string }[] {
  const warnings: { field: string, message: string }[] = []
  if (kind === 'salt' && Number(data.percent) > 1) {
    warnings.push({ field: 'data.percent', message: `${data.percent} % salt is far above the few tenths of a percent ponds are usually kept at.` })
  }
  const expected = expectedAmount(kind, data, volumeLitres)
  const used = kind === 'salt' ? Number(data.amountKg) : Number(data.amount)
  if (expected && Math.abs(used - expected.value) > MISMATCH * expected.value) {
    warnings.push({
      field: kind === 'salt' ? 'data.amountKg' : 'data.amount',
      message: `${round(used)} ${expected.unit} does not match the level for ${round(volumeLitres!)} L, which works out to ${round(expected.value)} ${expected.unit}. Check the amount, the unit and the volume.`,
    })
  }
  if (kind === 'water_change' && volumeLitres && Number(data.litresChanged) > volumeLitres) {
    warnings.push({ field: 'data.litresChanged', message: `More water changed than the pond holds (${round(volumeLitres)} L).` })
  }
  return warnings
}

/** Shown, unfolded, beside every whole-pond treatment, together with DOSE_CAUTIONS (common practice). */
export const POND_TREATMENT_CAUTIONS: readonly string[] = Object.freeze([
  'Aerate the pond well during and after treatment: many treatments lower dissolved oxygen.',
  'Biological filters and UV may need bypassing or switching off during a bath treatment: follow the product label.',
  'Salt stays in the pond until water is changed: measure salinity before adding more.',
  'Follow local rules on discharging treated water.',
])
