import { spawnSync } from 'node:child_process'
import { describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { testEnv } from '../support/env'

function run(command: string[]) {
  const result = spawnSync(command[0]!, command.slice(1), { cwd: '/', encoding: 'utf8' })
  if (result.status !== 0) throw new Error(`${command.join(' ')} failed: ${result.stderr}`)
}

describe('health', () => {
  it('reports the database up, then 503 while it is stopped, then up again', async () => {
    const client = new ApiClient()
    const up = await client.get('/api/health')
    expect(up.status).toBe(200)
    expect(up.body).toEqual({ ok: true, db: 'up' })
    run(testEnv().pgStopCommand)
    try {
      const down = await client.get('/api/health')
      expect(down.status).toBe(503)
      expect(down.body).toEqual({ ok: false, db: 'down' })
    }
    finally {
      run(testEnv().pgStartCommand)
    }
    let again = await client.get('/api/health')
    for (let i = 0; i < 50 && again.status !== 200; i++) {
      await new Promise(r => setTimeout(r, 100))
      again = await client.get('/api/health')
    }
    expect(again.body).toEqual({ ok: true, db: 'up' })
  })
})
