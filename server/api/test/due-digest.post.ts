/**
 * Tests only: runs the daily digest job for the clock the request sets. Answers 404 unless the
 * server was started with NUXT_TEST_CLOCK and the request carries its secret (server/utils/clock.ts).
 */
export default defineEventHandler(async (event) => {
  if (!testClockAllowed(event)) throw createError({ statusCode: 404, statusMessage: 'Not found' })
  return sendDueDigests(serverNow(event), appOrigin(event))
})
