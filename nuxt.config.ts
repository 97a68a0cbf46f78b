// Fintrail: Nuxt 4 app with a Nitro server, PostgreSQL through Drizzle, sessions from nuxt-auth-utils.
import { build } from 'esbuild'
import { buildUploadWorker } from './scripts/build-upload-worker'

// CSP source keywords keep their quotes in the header.
const SELF = '\'self\''
const NONE = '\'none\''

export default defineNuxtConfig({
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'nuxt-auth-utils', '@nuxt/eslint', 'nuxt-security', '@vite-pwa/nuxt'],
  devtools: { enabled: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Fintrail',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'theme-color', content: '#0d3b3e' },
      ],
      link: [
        { rel: 'manifest', href: '/manifest.webmanifest' },
        { rel: 'icon', type: 'image/png', href: '/icons/favicon-32.png' },
        { rel: 'apple-touch-icon', href: '/icons/apple-touch-icon-180.png' },
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
    // An S3-compatible bucket for photos and uploads (empty: files stay in storageDir). See docs/operations.md.
    storageS3Bucket: '',
    storageS3Endpoint: '',
    storageS3Region: '',
    storageS3AccessKeyId: '',
    storageS3SecretAccessKey: '',
    // 'true' or 'false'; empty: path style whenever an endpoint is set.
    storageS3ForcePathStyle: '',
    smtpHost: '127.0.0.1',
    smtpPort: 1025,
    mailFrom: 'Fintrail <no-reply@fintrail.local>',
    // The outbox worker: attempts after the first, and the first retry's delay (doubled each time).
    mailRetryLimit: 6,
    mailRetryDelaySeconds: 10,
    // PostgreSQL schema of the job queue (pg-boss), in the app's database.
    jobsSchema: 'pgboss',
    // On SIGTERM a running job gets this long to finish before it is failed back to the queue for another instance.
    jobsStopGraceSeconds: 5,
    // First automatic retry of a photo whose files could not be written (doubled each time).
    photoRetryDelaySeconds: 30,
    // How often each instance finishes photos whose instance stopped mid-way (0: only at start).
    photoRecoveryIntervalSeconds: 60,
    // An upload's last request waits this long for its sizes (made by the photo-derive job) before answering 'pending'.
    photoFinishWaitSeconds: 30,
    // Workers of the photo-derive job in this process: 'auto' is its share of the machine's photo concurrency, 0 leaves the work to other instances.
    photoDeriveWorkers: 'auto',
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
  // The page the service worker keeps for starting the app with no network: rendered with no session and no data.
  routeRules: { '/offline-shell': { ssr: false } },
  experimental: {
    // A link's page code loads when the person is about to follow it (pointer over it, focus, touch), not
    // for every link that scrolls into view: on a slow link the profile would fetch four other pages' code.
    defaults: { nuxtLink: { prefetchOn: { visibility: false, interaction: true } } },
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
    // Built assets are written with .br and .gz copies beside them and served in the encoding the browser takes.
    compressPublicAssets: { gzip: true, brotli: true },
  },
  typescript: { strict: true },
  telemetry: false,
  hooks: {
    // Lazy parts (the uploader, the charts, the entry forms) load when they are opened or scrolled to. Hinting
    // every one of them for prefetch would send them all anyway, competing with the page on a slow link.
    'build:manifest'(manifest) {
      for (const chunk of Object.values(manifest)) chunk.prefetch = false
    },
  },
  // The app reads the signed-in person from /api/me (stores/session.ts), never from the module's
  // useUserSession: its plugin would add an inner request to /api/_auth/session to every server render.
  auth: { loadStrategy: 'none' },
  eslint: { config: { stylistic: true } },
  // Installable app and offline start (see "Offline at the pond side" in DEVELOPERS.md). Our own service worker
  // (service-worker/sw.ts): Workbox precaches the built files; records are kept in IndexedDB by the app, never here.
  pwa: {
    strategies: 'injectManifest',
    srcDir: '../service-worker',
    filename: 'sw.ts',
    registerType: 'autoUpdate',
    injectRegister: false,
    // Registered by app/plugins/offline.client.ts (a plain register call, no inline script, no extra library).
    client: { registerPlugin: false, installPrompt: false, periodicSyncForUpdates: 0 },
    manifest: {
      name: 'Fintrail',
      short_name: 'Fintrail',
      description: 'Lifelong identity and medical records for individual pond fish',
      lang: 'en',
      start_url: '/',
      scope: '/',
      display: 'standalone',
      background_color: '#fbf9f4',
      theme_color: '#0d3b3e',
      icons: [
        { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png' },
        { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png' },
        { src: '/icons/maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
      ],
    },
    includeManifestIcons: false,
    injectManifest: {
      // The .br/.gz copies beside each file are left out: the browser gets one encoding and stores it decoded.
      globPatterns: ['_nuxt/**/*.{js,css,woff,woff2}', 'icons/*.png'],
      maximumFileSizeToCacheInBytes: 3 * 1024 * 1024,
    },
    devOptions: { enabled: false },
  },
  // Security headers only (nuxt-security). Its request guards are off: the app has its own sign-in limiter,
  // same-origin check and text-input check, and a size limiter or XSS filter would refuse tus chunks,
  // archives and ordinary JSON. Upgrading requests to https is added at run time for an https origin
  // (server/plugins/security-origin.ts): on a plain-http LAN address it would break every asset.
  security: {
    headers: {
      contentSecurityPolicy: {
        'default-src': [SELF],
        'base-uri': [NONE],
        'connect-src': [SELF],
        // Fonts are bundled files; data: covers small fonts a stylesheet inlines.
        'font-src': [SELF, 'data:'],
        'form-action': [SELF],
        'frame-ancestors': [NONE],
        'frame-src': [NONE],
        // blob: for the previews of a chosen photo (uploader thumbnails, which-fish); data: for inline icons.
        'img-src': [SELF, 'data:', 'blob:'],
        'manifest-src': [SELF],
        'media-src': [SELF],
        'object-src': [NONE],
        // Only scripts carrying this response's nonce, and what they load ('strict-dynamic'); no eval.
        'script-src': [SELF, '\'strict-dynamic\'', '\'nonce-{{nonce}}\''],
        'script-src-attr': [NONE],
        // Vue, Uppy and Chart.js set style attributes; styles cannot run code.
        'style-src': [SELF, '\'unsafe-inline\''],
        'worker-src': [SELF],
        'upgrade-insecure-requests': false,
      },
      crossOriginEmbedderPolicy: 'credentialless',
      // Stricter than no-referrer would break our own POSTs: Chromium then sends "Origin: null",
      // which the same-origin check refuses.
      referrerPolicy: 'strict-origin-when-cross-origin',
      // Browsers ignore it over plain http; behind https it keeps the next visits on https.
      strictTransportSecurity: { maxAge: 15552000, includeSubdomains: false },
      xContentTypeOptions: 'nosniff',
      xFrameOptions: 'DENY',
      // The camera stays allowed for this site only: taking a photo at the pond side.
      permissionsPolicy: { 'camera': ['self'], 'display-capture': [], 'fullscreen': [], 'geolocation': [], 'microphone': [] },
    },
    nonce: true,
    sri: true,
    hidePoweredBy: true,
    removeLoggers: false,
    rateLimiter: false,
    requestSizeLimiter: false,
    xssValidator: false,
    corsHandler: false,
    allowedMethodsRestricter: false,
    csrf: false,
  },
  tailwindcss: { cssPath: '~/assets/css/main.css', viewer: false },
})
