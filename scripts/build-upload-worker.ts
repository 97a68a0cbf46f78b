// Bundles the upload worker (server/workers/upload-parser.ts and what it imports) into one file beside
// the built server, where server/utils/upload-worker.ts finds it. Nitro bundles route code only, and a
// worker thread needs a file of its own to start from.
import { join, resolve } from 'node:path'
import { build } from 'esbuild'

export const UPLOAD_WORKER_FILE = 'workers/upload-parser.mjs'

export async function buildUploadWorker(serverDir: string) {
  const root = resolve(import.meta.dirname, '..')
  await build({
    entryPoints: [join(root, 'server/workers/upload-parser.ts')],
    outfile: join(serverDir, UPLOAD_WORKER_FILE),
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    // Some CommonJS dependencies call require(); give the ESM bundle one.
    banner: { js: 'import { createRequire as __createRequire } from "node:module"; const require = __createRequire(import.meta.url);' },
    logLevel: 'warning',
  })
}
