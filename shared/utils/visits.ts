// Vet visits: a vet opens a visit at a pond, ticks the fish seen, works (every entry, pond event and
// water test they record there meanwhile is linked to it), and closes it with findings.
import { z } from 'zod'
import { VISIT_PURPOSES } from './enums'

export type VisitPurpose = typeof VISIT_PURPOSES[number]

export const VISIT_PURPOSE_LABELS: Record<VisitPurpose, string> = {
  health_check: 'Routine health check',
  sick_call: 'Sick call',
  surgery: 'Surgery',
  follow_up: 'Follow-up',
}

const fishSeen = z.array(z.uuid('Choose fish of this pond')).max(500, 'At most 500 fish')
  .refine(ids => new Set(ids).size === ids.length, 'Each fish once')
const findings = z.string('Enter text').trim().max(8000, 'At most 8000 characters')

export const visitCreateSchema = z.strictObject({
  visitedOn: z.iso.date('Use the form YYYY-MM-DD')
    // A visit is recorded on the day or afterwards; a day of slack for time zones ahead of UTC.
    .refine(day => day <= new Date(Date.now() + 86_400_000).toISOString().slice(0, 10), 'Cannot be in the future')
    .refine(day => day >= '1990-01-01', 'Too early'),
  purpose: z.enum(VISIT_PURPOSES, 'Choose health check, sick call, surgery or follow-up'),
  fishSeen: fishSeen.default([]),
})

export const visitUpdateSchema = z.strictObject({
  purpose: z.enum(VISIT_PURPOSES, 'Choose health check, sick call, surgery or follow-up').optional(),
  findings: findings.optional(),
  fishSeen: fishSeen.optional(),
})

export const visitCloseSchema = z.strictObject({
  findings: findings.min(1, 'Write the findings: they go to the owner and keepers'),
})

export const visitIdParams = z.object({ pondId: z.uuid(), visitId: z.uuid() })
