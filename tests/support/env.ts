import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'

export const ROOT = resolve(import.meta.dirname, '../..')

export interface TestEnv {
  databaseUrl: string
  pgDataDir: string
  pgPort: number
  pgStartCommand: string[]
  pgStopCommand: string[]
  smtpPort: number
  inboxUrl: string
  sessionPassword: string
  storageDir: string
}

let cached: TestEnv | undefined

/** Written by scripts/test.sh after it has started the test database and the fake mail service. */
export function testEnv(): TestEnv {
  // FINTRAIL_TEST_ENV lets a second person run test files against a database of their own.
  cached ??= JSON.parse(readFileSync(resolve(ROOT, process.env.FINTRAIL_TEST_ENV ?? 'storage/test-env.json'), 'utf8')) as TestEnv
  return cached
}

// Overridable so that two people can run test files at once on one machine.
export const MAIN_PORT = Number(process.env.FINTRAIL_TEST_PORT ?? 3100)
export const MAIN_URL = `http://127.0.0.1:${MAIN_PORT}`

/** The test server's clock secret (server/utils/clock.ts), derived from this run's random session password. */
export function testClockSecret() {
  return createHash('sha256').update(`test-clock:${testEnv().sessionPassword}`).digest('hex')
}

/** Headers that make the test server work out due lists (and run the digest) as of `now`. */
export function fixedClock(now: string | Date): Record<string, string> {
  return { 'x-fintrail-test-clock': testClockSecret(), 'x-fintrail-test-now': new Date(now).toISOString() }
}
