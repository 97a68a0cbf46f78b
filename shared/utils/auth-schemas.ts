import { z } from 'zod'
import { isCommonPassword } from './common-passwords'
import { DECIMAL_MARKS, UNIT_SYSTEMS } from './enums'

export const PASSWORD_MIN_LENGTH = 10

export const emailSchema = z.string().trim().toLowerCase().max(254, 'At most 254 characters').pipe(z.email('Enter a valid e-mail address'))

export const newPasswordSchema = z.string()
  .min(PASSWORD_MIN_LENGTH, `At least ${PASSWORD_MIN_LENGTH} characters`)
  .max(200, 'At most 200 characters')
  .refine(p => !isCommonPassword(p), 'This password is too common: choose another')

export const signUpSchema = z.strictObject({
  name: z.string().trim().min(1, 'Enter your name').max(120, 'At most 120 characters'),
  email: emailSchema,
  password: newPasswordSchema,
  // The sign-up page sends the mark of the browser's locale; without it a point is assumed.
  decimalMark: z.enum(DECIMAL_MARKS, 'Choose point or comma').optional(),
})

export const signInSchema = z.strictObject({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password').max(200, 'At most 200 characters'),
})

export const changePasswordSchema = z.strictObject({
  currentPassword: z.string().min(1, 'Enter your current password').max(200),
  newPassword: newPasswordSchema,
})

export const resetRequestSchema = z.strictObject({ email: emailSchema })

export const resetPasswordSchema = z.strictObject({
  token: z.string().min(20).max(200),
  password: newPasswordSchema,
})

export const accountUpdateSchema = z.strictObject({
  name: z.string().trim().min(1, 'Enter your name').max(120, 'At most 120 characters').optional(),
  units: z.enum(UNIT_SYSTEMS).optional(),
  decimalMark: z.enum(DECIMAL_MARKS, 'Choose point or comma').optional(),
})
