import { defineConfig } from 'vitest/config'

// Unit tests run on the shared computation alone (no database, no build: `--project unit` works on a
// bare checkout); API and browser tests run against the built server (started in their global setup)
// and the real PostgreSQL, one file at a time because some of them restart the server or stop the database.
const serverSetup = ['tests/support/global-setup.ts']

// FINTRAIL_TEST_STORE=s3 (the second pass of scripts/test.sh): the tests that store photos and archives run
// again, this time against a fake S3 started by their global setup, with the same expectations.
const OBJECT_STORAGE_TESTS = [
  'tests/api/photos-protocol.test.ts',
  'tests/api/photos-files.test.ts',
  'tests/api/photos-gallery.test.ts',
  'tests/api/photos-resume.test.ts',
  'tests/api/archive.test.ts',
  'tests/api/archive-export.test.ts',
  'tests/api/which-fish.test.ts',
  'tests/api/object-storage.test.ts',
  'tests/api/instances.test.ts',
]

function objectStorageEnv() {
  // The fake S3 listens on the last port of the test range; the cookie test's use of it is not in this pass.
  const port = Number(process.env.FINTRAIL_TEST_PORT ?? 3100) + 19
  const env = {
    NUXT_STORAGE_S3_BUCKET: 'fintrail-test',
    NUXT_STORAGE_S3_ENDPOINT: `http://127.0.0.1:${port}`,
    NUXT_STORAGE_S3_ACCESS_KEY_ID: 'S3RVER',
    NUXT_STORAGE_S3_SECRET_ACCESS_KEY: 'S3RVER',
  }
  // Set here, before the global setup starts servers, so every server the tests start gets them too.
  Object.assign(process.env, env)
  return env
}

export default defineConfig({
  test: {
    fileParallelism: false,
    projects: process.env.FINTRAIL_TEST_STORE === 's3'
      ? [{
          test: {
            name: 'api-s3',
            globalSetup: ['tests/support/global-setup-s3.ts'],
            include: OBJECT_STORAGE_TESTS,
            env: objectStorageEnv(),
            // Every byte crosses HTTP once more (to the fake S3, in this machine's CPU): slower on a busy machine.
            testTimeout: 90_000,
            hookTimeout: 60_000,
          },
        }]
      : [
          {
            tsconfig: 'tests/unit/tsconfig.json',
            test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' },
          },
          {
            test: {
              name: 'api',
              globalSetup: serverSetup,
              include: ['tests/api/**/*.test.ts'],
              exclude: ['tests/api/object-storage.test.ts'],
              testTimeout: 30_000,
              hookTimeout: 60_000,
            },
          },
          {
            test: {
              name: 'browser',
              globalSetup: serverSetup,
              include: ['tests/browser/**/*.test.ts'],
              testTimeout: 60_000,
              hookTimeout: 60_000,
            },
          },
        ],
  },
})
