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
  cached ??= JSON.parse(readFileSync(resolve(ROOT, 'storage/test-env.json'), 'utf8')) as TestEnv
  return cached
}

export const MAIN_PORT = 3100
export const MAIN_URL = `http://127.0.0.1:${MAIN_PORT}`
