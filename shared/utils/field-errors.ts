import type { z } from 'zod'
import type { FieldErrors } from '../types'

// One shape for every validation failure, on the server's 400 and in the form alike.
export function fieldErrorsFrom(error: z.ZodError): FieldErrors {
  const errors: FieldErrors = {}
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_'
    ;(errors[key] ??= []).push(issue.message)
  }
  return errors
}
