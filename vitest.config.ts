import { defineConfig } from 'vitest/config'

// Unit tests run on the shared computation alone; API and browser tests run against the built
// server (started in the global setup) and the real PostgreSQL, one file at a time because some
// of them restart the server or stop the database.
export default defineConfig({
  test: {
    fileParallelism: false,
    globalSetup: ['tests/support/global-setup.ts'],
    projects: [
      {
        test: { name: 'unit', include: ['tests/unit/**/*.test.ts'], environment: 'node' },
      },
      {
        test: {
          name: 'api',
          include: ['tests/api/**/*.test.ts'],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          testTimeout: 60_000,
          hookTimeout: 60_000,
        },
      },
    ],
  },
})
