import { DUE_DIGEST_JOB } from '../../utils/due-digest'

/**
 * Tests only: sends the daily digest job through pg-boss, as the schedule does, with the clock the
 * request sets. Answers 404 unless the server was started with NUXT_TEST_CLOCK and the request
 * carries its secret (server/utils/clock.ts).
 */
export default defineEventHandler(async (event) => {
  if (!testClockAllowed(event)) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  const jobId = await sendJob(DUE_DIGEST_JOB, { now: serverNow(event).toISOString() })
  setResponseStatus(event, 202)
  return { jobId }
})
