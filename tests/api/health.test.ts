import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { MAIN_PORT, testEnv } from '../support/env'
import { startServer } from '../support/server'

function run(command: string[]) {
  const result = spawnSync(command[0]!, command.slice(1), { cwd: '/', encoding: 'utf8' })
  if (result.status !== 0) throw new Error(`${command.join(' ')} failed: ${result.stderr}`)
}

describe('health', () => {
  it('reports the database up, then 503 while it is stopped, then up again', async () => {
    const client = new ApiClient()
    const up = await client.get('/api/health')
    expect(up.status).toBe(200)
    expect(up.body).toMatchObject({ ok: true, db: 'up', storage: 'ok', queue: { waiting: expect.any(Number), oldestSeconds: expect.any(Number) } })
    run(testEnv().pgStopCommand)
    try {
      const down = await client.get('/api/health')
      expect(down.status).toBe(503)
      expect(down.body).toMatchObject({ ok: false, db: 'down' })
    }
    finally {
      run(testEnv().pgStartCommand)
    }
    let again = await client.get('/api/health')
    for (let i = 0; i < 50 && again.status !== 200; i++) {
      await new Promise(r => setTimeout(r, 100))
      again = await client.get('/api/health')
    }
    expect(again.body).toMatchObject({ ok: true, db: 'up', storage: 'ok' })
  })
})

describe('health of the storage folder', () => {
  it('answers 503 "not writable" when the storage folder cannot be written', async () => {
    // A regular file where the folder should be: refused even for root, unlike a chmod.
    const dir = mkdtempSync(join(tmpdir(), 'fintrail-health-'))
    const notAFolder = join(dir, 'storage')
    writeFileSync(notAFolder, 'not a folder')
    const server = await startServer(MAIN_PORT + 3, { NUXT_STORAGE_DIR: notAFolder }, { acceptUnhealthy: true })
    try {
      const response = await new ApiClient(server.url).get('/api/health')
      expect(response.status).toBe(503)
      expect(response.body).toMatchObject({ ok: false, db: 'up', storage: 'not writable' })
    }
    finally {
      await server.stop()
      rmSync(dir, { recursive: true, force: true })
    }
  })
})
