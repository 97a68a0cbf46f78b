import { z } from 'zod'
import { POND_ROLES } from './enums'
import { emailSchema } from './auth-schemas'
import { checkDaySchema, waterTestIntervalSchema } from './due'

export const uuidParam = z.uuid('Not a valid id')

export const pondIdParams = z.object({ pondId: uuidParam })

export const pondCreateSchema = z.strictObject({
  name: z.string().trim().min(1, 'Give the pond a name').max(120, 'At most 120 characters'),
  volumeLitres: z.number('Enter a number').min(0, 'Cannot be negative').max(100_000_000, 'Too large for a pond').nullable().optional(),
  notes: z.string().max(4000, 'At most 4000 characters').optional(),
  healthCheckDay: checkDaySchema.optional(),
  waterTestIntervalDays: waterTestIntervalSchema.optional(),
})

export const pondUpdateSchema = pondCreateSchema.partial()

export const invitationCreateSchema = z.strictObject({
  email: emailSchema,
  role: z.enum(POND_ROLES, 'Choose owner, keeper or vet'),
})

export const memberRoleSchema = z.strictObject({
  role: z.enum(POND_ROLES, 'Choose owner, keeper or vet'),
})
