// What each kind of timeline entry holds. One zod schema per kind checks the form before it is
// sent and the route when it arrives; `entryCreateSchema` is their union with `kind` as the key.
// Values are stored in metric units; the typed text may be kept beside them in `entered`.
import { z } from 'zod'
import { PLAUSIBILITY_CODES, plausibilityWarningSchema } from './plausibility'

import { STORED_TIMELINE_KINDS, type ENTRY_KINDS } from './enums'

export type EntryKind = typeof ENTRY_KINDS[number]
/** What a fish's timeline shows: its stored entries and the whole-pond events of the ponds it lived in. */
export const TIMELINE_KINDS = [...STORED_TIMELINE_KINDS, 'pond_event'] as const
export type TimelineKind = typeof TIMELINE_KINDS[number]

const limitedText = (max: number, missing = 'Enter text') => z.string(missing).trim().max(max, `At most ${max} characters`)
const requiredText = (max: number, missing: string) => limitedText(max, missing).min(1, missing)
const calendarDay = z.iso.date('Use the form YYYY-MM-DD')
const amount = (what: string, max: number, unit: string) => z.number(`Enter the ${what} as a number`)
  .positive(`The ${what} must be more than 0`)
  .max(max, `More than ${max} ${unit} is not a plausible ${what}`)
// A weight or length below what a scale or a ruler at the pond can read is a typing slip, and values
// like 1e-300 break the condition factor (length cubed underflows to 0).
const bodyAmount = (what: string, min: number, max: number, unit: string) => amount(what, max, unit)
  .min(min, `Less than ${min} ${unit} is not a ${what} a fish can have`)
const minutes = (what: string, max: number) => z.number(`Enter the ${what} in minutes`)
  .min(0, `The ${what} cannot be negative`).max(max, `More than ${max} minutes is not a plausible ${what}`)

// Entered text as typed ("2 lb 3 oz"), kept for the record; computation reads the metric fields only.
const enteredAs = z.strictObject({
  weight: limitedText(40).optional(),
  length: limitedText(40).optional(),
  waterTemperature: limitedText(40).optional(),
}).optional()

// ---- measurement ------------------------------------------------------------------------------

export const LENGTH_TYPES = ['total', 'fork', 'standard'] as const
export type LengthType = typeof LENGTH_TYPES[number]

/** The smallest weight and length taken: a newly hatched koi fry weighs about 2 mg and measures about 5 mm (from memory, common practice), so a weighable pond fish is far above both. */
export const MIN_WEIGHT_G = 0.1
export const MIN_LENGTH_CM = 0.5

// The largest koi on record weigh about 40 kg and measure about 1.2 m.
export const MEASUREMENT_LIMITS = { weightG: 60_000, lengthCm: 150 } as const

export const measurementData = z.strictObject({
  weightG: bodyAmount('weight', MIN_WEIGHT_G, MEASUREMENT_LIMITS.weightG, 'g').optional(),
  lengthCm: bodyAmount('length', MIN_LENGTH_CM, MEASUREMENT_LIMITS.lengthCm, 'cm').optional(),
  lengthType: z.enum(LENGTH_TYPES, 'Choose total, fork or standard length').default('total'),
  entered: enteredAs,
  note: limitedText(1000).optional(),
  // Plausibility warnings the author saw and confirmed; the server replaces whatever a client sends here.
  warnings: z.array(plausibilityWarningSchema).max(PLAUSIBILITY_CODES.length).optional(),
}).refine(d => d.weightG !== undefined || d.lengthCm !== undefined, { message: 'Enter a weight, a length or both', path: ['weightG'] })

// ---- observation ------------------------------------------------------------------------------

export const OBSERVATION_SIGNS = {
  behaviour: ['eating_well', 'poor_appetite', 'not_eating', 'lethargic', 'flashing', 'rubbing', 'clamped_fins', 'gasping', 'hiding', 'sitting_on_bottom', 'floating', 'erratic_swimming'],
  appearance: ['white_spots', 'red_streaks', 'ulcer', 'fin_damage', 'cloudy_eye', 'raised_scales', 'pale_gills', 'excess_mucus', 'swollen_belly', 'lump', 'thin'],
} as const
export const ALL_OBSERVATION_SIGNS = [...OBSERVATION_SIGNS.behaviour, ...OBSERVATION_SIGNS.appearance] as const
export type ObservationSign = typeof ALL_OBSERVATION_SIGNS[number]

export const observationData = z.strictObject({
  signs: z.array(z.enum(ALL_OBSERVATION_SIGNS, 'Choose from the listed signs'))
    .max(ALL_OBSERVATION_SIGNS.length)
    .refine(signs => new Set(signs).size === signs.length, 'Each sign once')
    .default([]),
  text: limitedText(4000).default(''),
  // A photo of this fish from its photo list; the route checks that it belongs to the fish.
  photoId: z.uuid('Choose one of this fish’s photos').optional(),
}).refine(d => d.signs.length > 0 || d.text !== '', { message: 'Tick what you saw or describe it', path: ['text'] })

// ---- exam -------------------------------------------------------------------------------------

export const BODY_SYSTEMS = ['general', 'skin', 'fins', 'gills', 'eyes', 'mouth', 'buoyancy', 'coelom', 'vent', 'musculoskeletal'] as const
export type BodySystem = typeof BODY_SYSTEMS[number]
export const FINDING_STATES = ['normal', 'abnormal', 'not_examined'] as const

const examFinding = z.strictObject({
  system: z.enum(BODY_SYSTEMS, 'Choose a body system'),
  state: z.enum(FINDING_STATES, 'Choose normal, abnormal or not examined'),
  note: limitedText(1000).default(''),
}).refine(f => f.state !== 'abnormal' || f.note !== '', { message: 'Describe what is abnormal', path: ['note'] })

export const examData = z.strictObject({
  reason: limitedText(200).default(''),
  history: limitedText(4000).default(''),
  findings: z.array(examFinding).max(BODY_SYSTEMS.length)
    .refine(list => new Set(list.map(f => f.system)).size === list.length, 'Each body system once')
    .default([]),
  assessment: limitedText(4000).default(''),
  plan: limitedText(4000).default(''),
}).refine(d => d.findings.length > 0 || d.assessment !== '', { message: 'Record at least one finding or an assessment', path: ['assessment'] })

// ---- problem ----------------------------------------------------------------------------------

export const PROBLEM_STATUSES = ['suspected', 'active', 'resolved'] as const
export type ProblemStatus = typeof PROBLEM_STATUSES[number]

export const problemData = z.strictObject({
  name: requiredText(160, 'Name the problem'),
  onset: calendarDay,
  status: z.enum(PROBLEM_STATUSES, 'Choose suspected, active or resolved'),
  resolvedOn: calendarDay.optional(),
  notes: limitedText(4000).default(''),
}).superRefine((d, ctx) => {
  if (d.status === 'resolved' && !d.resolvedOn) ctx.addIssue({ code: 'custom', path: ['resolvedOn'], message: 'Give the date it resolved' })
  if (d.status !== 'resolved' && d.resolvedOn) ctx.addIssue({ code: 'custom', path: ['resolvedOn'], message: 'Only a resolved problem has a resolution date' })
  if (d.resolvedOn && d.resolvedOn < d.onset) ctx.addIssue({ code: 'custom', path: ['resolvedOn'], message: 'Cannot be before the onset' })
})

// ---- procedure and anaesthesia ----------------------------------------------------------------

/**
 * Our own fixed list of procedures. Standing facts come from the code (an eye is gone because the
 * code is 'enucleation'), never from the wording of `name`, which is free text for the record.
 */
export const PROCEDURE_CODES = [
  'enucleation', 'mass_removal', 'biopsy', 'fin_trim', 'wound_care', 'microchip_implant', 'wen_trim', 'gill_clip', 'skin_scrape', 'other',
] as const
export type ProcedureCode = typeof PROCEDURE_CODES[number]
export const BODY_SIDES = ['left', 'right', 'both', 'not_applicable'] as const
export type BodySide = typeof BODY_SIDES[number]

/** Codes whose side must be named (an eye removal always says which eye). */
export const SIDED_PROCEDURE_CODES: readonly ProcedureCode[] = ['enucleation']

const personId = (message: string) => z.uuid(message)

export const procedureData = z.strictObject({
  code: z.enum(PROCEDURE_CODES, 'Choose the procedure from the list (or “other”)'),
  /** Free text: what was done in the vet's own words. Required for “other”. */
  name: limitedText(160).default(''),
  bodySite: limitedText(160).default(''),
  side: z.enum(BODY_SIDES, 'Choose left, right, both or not applicable'),
  /** Who performed it, as written on the record. Filled from `performedById` when a vet of the pond was chosen. */
  performedBy: limitedText(120).default(''),
  /** A vet of the fish's pond; the server checks it and writes their name into `performedBy`. */
  performedById: personId('Choose one of the pond’s vets').optional(),
  notes: limitedText(4000).default(''),
  outcome: limitedText(2000).default(''),
  recheckOn: calendarDay.optional(),
  anaesthesiaEntryId: z.uuid('Not an anaesthesia record of this fish').optional(),
}).superRefine((d, ctx) => {
  if (d.code === 'other' && d.name === '') ctx.addIssue({ code: 'custom', path: ['name'], message: 'Describe the procedure' })
  if (SIDED_PROCEDURE_CODES.includes(d.code) && d.side === 'not_applicable') ctx.addIssue({ code: 'custom', path: ['side'], message: 'Say which eye: left, right or both' })
  if (d.performedBy === '' && !d.performedById) ctx.addIssue({ code: 'custom', path: ['performedBy'], message: 'Who performed it? Choose a vet of the pond or write the name' })
})

export const COMMON_ANAESTHETICS = ['MS-222 (tricaine methanesulfonate)', 'Eugenol (clove oil)', 'Isoeugenol', 'Benzocaine'] as const

/** MS-222 is the one agent here that is acidic in solution and needs a buffer. */
export function isTricaine(agent: string): boolean {
  return /ms-?222|tricaine/i.test(agent)
}

export const anaesthesiaData = z.strictObject({
  agent: requiredText(120, 'Name the agent'),
  concentrationMgL: amount('bath concentration', 2000, 'mg/L'),
  buffer: limitedText(200).default(''),
  waterTemperatureC: z.number('Enter the water temperature as a number').min(0, 'Below 0 °C the water is ice').max(40, 'Above 40 °C is not pond water').optional(),
  inductionMinutes: minutes('induction time', 120).optional(),
  recoveryMinutes: minutes('recovery time', 720).optional(),
  monitoring: limitedText(4000).default(''),
  entered: enteredAs,
}).refine(d => d.buffer === '' || isTricaine(d.agent), { message: 'A buffer is recorded only for MS-222', path: ['buffer'] })

// ---- treatment --------------------------------------------------------------------------------

/**
 * How the drug reaches the fish. A bath is either a timed bath in a separate (hospital) tank or the
 * whole pond treated (prolonged immersion). Stored entries from before the split say 'bath'.
 */
export const TREATMENT_ROUTES = ['dip', 'tank_bath', 'pond_immersion', 'injection', 'in_feed', 'topical'] as const
export type TreatmentRoute = typeof TREATMENT_ROUTES[number]
/** Routes where the fish is in the solution for a set time, so the time is part of the dose. */
export const TIMED_ROUTES: readonly TreatmentRoute[] = ['dip', 'tank_bath']
export const DOSE_UNITS = ['mg/L', 'g/L', 'mL/L', '%', 'mg/kg', 'mL/kg', 'mg/kg of feed', 'g/kg of feed', 'per fish'] as const
export const AMOUNT_UNITS = ['mg', 'g', 'kg', 'mL', 'L'] as const

export const treatmentData = z.strictObject({
  drug: requiredText(160, 'Name the drug or product'),
  route: z.enum(TREATMENT_ROUTES, 'Choose dip, hospital-tank bath, whole pond, injection, in feed or topical'),
  injectionSite: limitedText(120).optional(),
  dose: amount('dose', 100_000, 'units'),
  doseUnit: z.enum(DOSE_UNITS, 'Choose the dose unit'),
  startOn: calendarDay,
  durationDays: z.number('Enter the number of days').int('Whole days').min(1, 'At least 1 day').max(365, 'At most 365 days').optional(),
  endOn: calendarDay.optional(),
  // The course as a schedule: `doseCount` doses, `intervalHours` apart, the first at `firstDoseAt`
  // (or, when not given, at the entry's own date and time).
  intervalHours: z.number('Enter the hours between doses').positive('More than 0 hours').max(8760, 'At most a year between doses').optional(),
  doseCount: z.number('Enter the number of doses').int('A whole number of doses').min(1, 'At least 1 dose').max(1000, 'At most 1000 doses').optional(),
  firstDoseAt: z.iso.datetime({ offset: true, error: 'Give the date and time of the first dose' }).optional(),
  /** How long the fish stays in a dip or bath. */
  exposureMinutes: z.number('Enter the exposure in minutes').positive('More than 0 minutes').max(10_080, 'At most 7 days (10,080 minutes)').optional(),
  volumeTreatedL: amount('volume treated', 10_000_000, 'L').optional(),
  amountAdded: amount('amount added', 1_000_000, 'units').optional(),
  amountAddedUnit: z.enum(AMOUNT_UNITS, 'Choose mg, g, kg, mL or L').optional(),
  givenBy: limitedText(120).default(''),
  /** The vet of the pond who prescribed it, when someone else records it (a keeper or owner on instruction). */
  instructedById: personId('Choose one of the pond’s vets').optional(),
  /** The instructing vet's name, written by the server from `instructedById`. */
  instructedBy: limitedText(120).optional(),
  // When the vet wants to see the fish again; it shows in what is due until an exam on a later day.
  recheckOn: calendarDay.optional(),
  notes: limitedText(4000).default(''),
}).superRefine((d, ctx) => {
  const issue = (path: string, message: string) => ctx.addIssue({ code: 'custom', path: [path], message })
  if (d.route === 'injection' && !d.injectionSite) issue('injectionSite', 'Give the injection site')
  if (TIMED_ROUTES.includes(d.route) && d.exposureMinutes === undefined) issue('exposureMinutes', 'Give how many minutes the fish stays in the solution')
  if (d.durationDays !== undefined && d.endOn) issue('endOn', 'Give a duration or an end date, not both')
  if (d.endOn && d.endOn < d.startOn) issue('endOn', 'Cannot end before it starts')
  if (d.doseCount !== undefined && d.doseCount > 1 && d.intervalHours === undefined) issue('intervalHours', 'Give the hours between doses')
  if (d.intervalHours !== undefined && d.doseCount === undefined) issue('doseCount', 'Give the number of doses')
  if ((d.amountAdded === undefined) !== (d.amountAddedUnit === undefined)) issue(d.amountAdded === undefined ? 'amountAdded' : 'amountAddedUnit', 'Give the amount added with its unit')
})

// ---- lab result -------------------------------------------------------------------------------

export const LAB_PANELS = ['haematology', 'biochemistry', 'skin_scrape', 'gill_biopsy', 'culture', 'other'] as const
export type LabPanel = typeof LAB_PANELS[number]

const analyte = z.strictObject({
  name: requiredText(80, 'Name the analyte'),
  value: z.number('Enter the value as a number').finite(),
  unit: limitedText(30).default(''),
  low: z.number('Enter the lower limit as a number').finite().optional(),
  high: z.number('Enter the upper limit as a number').finite().optional(),
}).refine(a => a.low === undefined || a.high === undefined || a.low <= a.high, { message: 'The lower limit is above the upper one', path: ['high'] })

const organism = z.strictObject({
  name: requiredText(120, 'Name the organism'),
  count: limitedText(80).default(''),
})

export const labResultData = z.strictObject({
  panel: z.enum(LAB_PANELS, 'Choose the panel'),
  panelName: limitedText(120).optional(),
  laboratory: limitedText(160).default(''),
  sample: limitedText(160).default(''),
  // Where the reference intervals came from: they depend on the laboratory, season and method.
  intervalSource: limitedText(200).default(''),
  analytes: z.array(analyte).max(80).default([]),
  organisms: z.array(organism).max(40).default([]),
  findings: limitedText(4000).default(''),
}).superRefine((d, ctx) => {
  if (d.panel === 'other' && !d.panelName) ctx.addIssue({ code: 'custom', path: ['panelName'], message: 'Name the test' })
  if (!d.analytes.length && !d.organisms.length && !d.findings) ctx.addIssue({ code: 'custom', path: ['findings'], message: 'Record values, organisms seen or findings' })
})

// ---- companion and death ----------------------------------------------------------------------

/** How two fish relate, in plain words of our own; read from the side the note was written on. */
export const COMPANION_RELATIONS = ['leads', 'stays_close', 'chases', 'avoids', 'spawns_with', 'parent_of', 'other'] as const
export type CompanionRelation = typeof COMPANION_RELATIONS[number]

export const companionData = z.strictObject({
  relatedFishId: z.uuid('Choose the other fish'),
  relation: z.enum(COMPANION_RELATIONS, 'Choose how they relate'),
  relationText: limitedText(80).optional(),
  note: limitedText(1000).default(''),
}).refine(d => d.relation !== 'other' || Boolean(d.relationText), { message: 'Describe the relation', path: ['relationText'] })

export const deathData = z.strictObject({
  cause: limitedText(300).default(''),
  euthanased: z.boolean('Yes or no').default(false),
  necropsy: limitedText(4000).default(''),
})

// ---- the union --------------------------------------------------------------------------------

export const ENTRY_DATA_SCHEMAS = {
  measurement: measurementData,
  observation: observationData,
  exam: examData,
  problem: problemData,
  procedure: procedureData,
  anaesthesia: anaesthesiaData,
  treatment: treatmentData,
  lab_result: labResultData,
  companion: companionData,
  death: deathData,
} as const

export type EntryData<K extends EntryKind = EntryKind> = z.output<typeof ENTRY_DATA_SCHEMAS[K]>

// Clock skew between a phone and the server is allowed for; a date-only value means midday UTC,
// which stays the same calendar day everywhere from UTC−11 to UTC+12.
const FUTURE_SLACK_MS = 10 * 60_000
export const occurredAtSchema = z.string('Give the date')
  .trim()
  .refine(value => /^\d{4}-\d{2}-\d{2}$/.test(value) ? z.iso.date().safeParse(value).success : z.iso.datetime({ offset: true }).safeParse(value).success,
    'Use a date (YYYY-MM-DD) or a date and time')
  .transform(value => (value.length === 10 ? `${value}T12:00:00.000Z` : new Date(value).toISOString()))
  .refine(value => value >= '1900-01-01', 'Too early')
  .refine(value => new Date(value).getTime() <= Date.now() + (value.endsWith('T12:00:00.000Z') ? 14 * 3_600_000 : FUTURE_SLACK_MS), 'Cannot be in the future')

// A client-chosen id makes a retried send after a lost answer find the entry it already wrote.
const clientEntryId = z.uuid('Not a valid id').optional()

const entryOf = <K extends EntryKind, S extends z.ZodType>(kind: K, data: S) => z.strictObject({
  id: clientEntryId,
  kind: z.literal(kind),
  occurredAt: occurredAtSchema,
  data,
})

export const entryCreateSchema = z.discriminatedUnion('kind', [
  // The codes of the plausibility warnings the author has seen and wants saved anyway.
  entryOf('measurement', measurementData).extend({ acknowledgedWarnings: z.array(z.enum(PLAUSIBILITY_CODES, 'Unknown warning')).max(PLAUSIBILITY_CODES.length).optional() }),
  entryOf('observation', observationData),
  entryOf('exam', examData),
  entryOf('problem', problemData),
  // A procedure may bring its anaesthesia record along: both are written together or not at all.
  entryOf('procedure', procedureData).extend({ anaesthesia: anaesthesiaData.optional() }),
  entryOf('anaesthesia', anaesthesiaData),
  entryOf('treatment', treatmentData),
  entryOf('lab_result', labResultData),
  entryOf('companion', companionData),
  entryOf('death', deathData),
], { error: 'Choose what kind of entry this is' })

export type EntryCreateInput = z.input<typeof entryCreateSchema>
export type EntryCreate = z.output<typeof entryCreateSchema>

const reason = z.string('Say why').trim().min(3, 'Say why in a few words').max(500, 'At most 500 characters')

/** The route reads the envelope first; the data is checked against the entry's own kind afterwards. */
export const entryAmendEnvelope = z.strictObject({
  revision: z.number('The revision you amended is required').int().min(1),
  occurredAt: occurredAtSchema.optional(),
  data: z.record(z.string(), z.unknown(), 'Give the amended fields'),
  reason,
  acknowledgedWarnings: z.array(z.enum(PLAUSIBILITY_CODES, 'Unknown warning')).max(PLAUSIBILITY_CODES.length).optional(),
})

export function entryAmendSchemaFor(kind: EntryKind) {
  return entryAmendEnvelope.extend({ data: ENTRY_DATA_SCHEMAS[kind] })
}

export const enteredInErrorSchema = z.strictObject({ reason })

export const timelineQuerySchema = z.strictObject({
  kind: z.string().trim().max(300).optional()
    .transform(v => (v ? v.split(',').map(s => s.trim()).filter(Boolean) : []))
    .pipe(z.array(z.enum(TIMELINE_KINDS, 'Unknown kind')).max(TIMELINE_KINDS.length)),
  before: z.string().trim().max(200).optional(),
  limit: z.coerce.number('Enter a number').int('A whole number').min(1, 'At least 1').max(200, 'At most 200').default(50),
})

export const entryIdParams = z.object({ entryId: z.uuid('Not a valid id') })

/** A dose of a treatment course checked off as given. `givenAt` defaults to now. */
export const doseGivenSchema = z.strictObject({
  // Made on the device (the outbox): a second send of the same tick finds the dose it already recorded.
  id: clientEntryId,
  doseNumber: z.number('Say which dose (1 for the first)').int('A whole number').min(1, 'Dose 1 is the first'),
  givenAt: occurredAtSchema.optional(),
  note: limitedText(500).default(''),
})
