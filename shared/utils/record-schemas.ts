import { z } from 'zod'

/** Entries per page of the health record: large enough that 5,000 entries take ten requests, small enough to stay lean. */
export const RECORD_PAGE_SIZE = 500
export const RECORD_PAGE_MAX = 1000

export const recordPageQuerySchema = z.strictObject({
  // The moment the record was opened: entries written later are not part of this print.
  asOf: z.iso.datetime({ offset: true, message: 'Give the moment the record was opened (ISO 8601)' }),
  after: z.string().trim().max(200).optional(),
  limit: z.coerce.number('Enter a number').int('A whole number').min(1, 'At least 1')
    .max(RECORD_PAGE_MAX, `At most ${RECORD_PAGE_MAX}`).default(RECORD_PAGE_SIZE),
})
