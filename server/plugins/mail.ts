// The worker that delivers the mail outbox (server/utils/mail-outbox.ts). Retries back off
// 10 s, 20 s, 40 s ... so a mail service that is down for a few minutes loses nothing.
export default defineNitroPlugin(() => {
  if (import.meta.prerender) return
  const config = useRuntimeConfig()
  registerJob(MAIL_JOB, deliverOutgoingMail, {
    retryLimit: Number(config.mailRetryLimit),
    retryDelay: Number(config.mailRetryDelaySeconds),
    retryBackoff: true,
    expireInSeconds: 120,
    pollingIntervalSeconds: 1,
    concurrency: 2,
  })
})
