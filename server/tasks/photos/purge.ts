// Hourly (nitro.scheduledTasks) and once at start (server/plugins/photos.ts).
export default defineTask({
  meta: {
    name: 'photos:purge',
    description: 'Deletes photos removed more than 30 days ago, unfinished uploads past their expiry, and stray files',
  },
  async run() {
    const result = await runPhotoMaintenance()
    if (result.purged || result.expiredUploads || result.strayFiles) console.log('[photos] maintenance:', JSON.stringify(result))
    return { result }
  },
})
