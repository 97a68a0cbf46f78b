import { rmSync } from 'node:fs'
import { join } from 'node:path'
import type { TestProject } from 'vitest/node'
import { MAIN_PORT, testEnv } from './env'
import { startFakeS3, type FakeS3 } from './fake-s3'
import { BACKUP_BUCKETS, OTHER_BUCKET, testS3Settings } from './stored-files'
import { startServer, type RunningServer } from './server'

let fakeS3: FakeS3 | undefined
let server: RunningServer | undefined

/** The object-storage pass: a fresh fake S3 (its bucket named in vitest.config.ts), then the test server using it. */
export async function setup(_project: TestProject) {
  const directory = join(testEnv().storageDir, '..', 'test-s3')
  rmSync(directory, { recursive: true, force: true })
  const settings = testS3Settings()
  fakeS3 = await startFakeS3(Number(new URL(settings.endpoint!).port), directory, [settings.bucket, OTHER_BUCKET, ...BACKUP_BUCKETS])
  server = await startServer(MAIN_PORT)
}

export async function teardown() {
  await server?.stop()
  await fakeS3?.stop()
}
