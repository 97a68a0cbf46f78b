import { defineConfig } from 'vitest/config'

// Unit tests run on the shared computation alone (no database, no build: `--project unit` works on a
// bare checkout); API and browser tests run against the built server (started in their global setup)
// and the real PostgreSQL, one file at a time because some of them restart the server or stop the database.
const serverSetup = ['tests/support/global-setup.ts']

export default defineConfig({
  test: {
    fileParallelism: false,
    projects: [
      {
        tsconfig: 'tests/unit/tsconfig.json',
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' },
      },
      {
        test: {
          name: 'api',
          globalSetup: serverSetup,
          include: ['tests/api/**/*.test.ts'],
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
