import { DUE_DIGEST_CRON, DUE_DIGEST_JOB } from '../utils/due-digest'

// The daily digest of what is due: a pg-boss schedule (kept in the database, so one running app sends it once
// a day however many times it restarts) that sends a job to this worker each morning.
export default defineNitroPlugin(() => {
  if (import.meta.prerender) return
  // `now` is set only by the test route (server/api/test/due-digest.post.ts); the schedule sends no data.
  registerJob<{ now?: string }>(DUE_DIGEST_JOB, async (data) => {
    await sendDueDigests(data?.now ? new Date(data.now) : new Date(), configuredOrigin())
  }, { retryLimit: 3, retryDelay: 60, expireInSeconds: 600 })
  whenJobsStart(boss => boss.schedule(DUE_DIGEST_JOB, DUE_DIGEST_CRON, {}, { tz: 'UTC' }))
})
