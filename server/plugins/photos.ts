// At start: finish what a stop interrupted, then run the purge once (the schedule runs it hourly after that).
// Not awaited, as Nitro would not wait for it anyway: requests are answered meanwhile.
export default defineNitroPlugin(() => {
  if (import.meta.prerender) return
  setTimeout(() => {
    recoverInterruptedPhotos()
      .then(() => runTask('photos:purge'))
      .catch(error => console.error('[photos] start-up maintenance failed:', error))
  }, 0)
})
