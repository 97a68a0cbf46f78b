// Fintrail: Nuxt 4 app with a Nitro server, PostgreSQL through Drizzle, sessions from nuxt-auth-utils.
import { build } from 'esbuild'
import { buildUploadWorker } from './scripts/build-upload-worker'

export default defineNuxtConfig({
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'nuxt-auth-utils', '@nuxt/eslint'],
  devtools: { enabled: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Fintrail',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'theme-color', content: '#0d3b3e' },
      ],
    },
  },
  css: [
    '@fontsource/nunito-sans/400.css',
    '@fontsource/nunito-sans/600.css',
    '@fontsource/nunito-sans/700.css',
    '@fontsource/nunito-sans/800.css',
    '@fontsource/nunito-sans/400-italic.css',
    '~/assets/css/main.css',
  ],
  runtimeConfig: {
    databaseUrl: '',
    appOrigin: '',
    trustProxy: false,
    storageDir: '',
    smtpHost: '127.0.0.1',
    smtpPort: 1025,
    mailFrom: 'Fintrail <no-reply@fintrail.local>',
    // The outbox worker: attempts after the first, and the first retry's delay (doubled each time).
    mailRetryLimit: 6,
    mailRetryDelaySeconds: 10,
    // PostgreSQL schema of the job queue (pg-boss), in the app's database.
    jobsSchema: 'pgboss',
    // First automatic retry of a photo whose files could not be written (doubled each time).
    photoRetryDelaySeconds: 30,
    // How often each instance finishes photos whose instance stopped mid-way (0: only at start).
    photoRecoveryIntervalSeconds: 60,
    // Failed sign-ins in the window: per account and address (then 429), per address over all accounts
    // (then 429), and per account from anywhere, above which each attempt waits up to the cap.
    signInLimit: 10,
    signInIpLimit: 100,
    signInAccountCeiling: 20,
    signInDelayCapMs: 3000,
    signInWindowSeconds: 900,
    sessionIdleSeconds: 60 * 60 * 24 * 7,
    sessionAbsoluteSeconds: 60 * 60 * 24 * 30,
    // Tests only: a secret that lets a request set the clock of the due lists and run the digest job.
    // Empty (the default) switches the test clock off entirely. See server/utils/clock.ts.
    testClock: '',
    session: {
      name: 'fintrail-session',
      maxAge: 60 * 60 * 24 * 30,
      cookie: { secure: true, sameSite: 'lax', httpOnly: true },
    },
  },
  compatibilityDate: '2026-01-01',
  nitro: {
    hooks: {
      // "Which fish is this?" runs OpenCV in a worker thread, which needs a file of its own beside the
      // server entry: bundled here (OpenCV included) as CommonJS, because OpenCV's loader uses __dirname.
      async compiled(nitro) {
        // The upload worker thread also starts from a file of its own, bundled beside the server.
        await buildUploadWorker(nitro.options.output.serverDir)
        await build({
          entryPoints: ['server/fish-id/worker.ts'], bundle: true, platform: 'node', target: 'node20', format: 'cjs',
          external: ['sharp'], outfile: `${nitro.options.output.serverDir}/which-fish-worker.cjs`, logLevel: 'warning',
        })
      },
    },
    experimental: { tasks: true },
    // Photos removed 30+ days ago, expired unfinished uploads, stray files (also run once at start).
    scheduledTasks: { '0 * * * *': ['photos:purge'] },
  },
  typescript: { strict: true },
  telemetry: false,
  eslint: { config: { stylistic: true } },
  tailwindcss: { cssPath: '~/assets/css/main.css', viewer: false },
})
