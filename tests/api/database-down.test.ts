import { randomUUID } from 'node:crypto'
import { spawnSync } from 'node:child_process'
import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { closeTestDb } from '../support/db'
import { testEnv } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'
import { countEntries, daysAgo } from '../support/timeline'

// Stops the test cluster's PostgreSQL, which every test file shares: vitest runs files one at a time
// (fileParallelism: false), and the cluster is started again and awaited before this file ends.
function run(command: string[]) {
  const result = spawnSync(command[0]!, command.slice(1), { cwd: '/', encoding: 'utf8' })
  if (result.status !== 0) throw new Error(`${command.join(' ')} failed: ${result.stderr}`)
}

async function waitForHealthy(client: ApiClient) {
  for (let i = 0; i < 100; i++) {
    const health = await client.get('/api/health')
    if (health.status === 200) return health
    await new Promise(r => setTimeout(r, 100))
  }
  throw new Error('the server did not report the database up again')
}

let stopped = false
afterAll(async () => {
  await closeTestDb()
  if (stopped) run(testEnv().pgStartCommand)
})

describe('while the database is down', () => {
  it('answers writes 503 with Retry-After, keeps the sign-in page, and recovers without a restart', async () => {
    const { client } = await signedInUser()
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    const entryId = randomUUID()
    const entry = { id: entryId, kind: 'observation', occurredAt: daysAgo(1), data: { signs: ['flashing'], text: 'Flashing at dusk' } }
    const anonymous = new ApiClient()

    run(testEnv().pgStopCommand)
    stopped = true
    try {
      const write = await client.post(`/api/fish/${fish.id}/timeline`, entry)
      expect(write.status).toBe(503)
      expect(Number(write.headers.get('retry-after'))).toBeGreaterThan(0)
      expect(write.body).toMatchObject({ statusCode: 503, message: expect.stringMatching(/Nothing was saved; try again/) })

      const newPond = await client.post('/api/ponds', { name: 'Pond while down', volumeLitres: 3000 })
      expect(newPond.status).toBe(503)
      expect(newPond.headers.get('retry-after')).toBeTruthy()

      // Signed out, the sign-in page needs no database.
      const page = await fetch(`${anonymous.baseUrl}/sign-in`, { headers: { accept: 'text/html' } })
      expect(page.status).toBe(200)
      expect(await page.text()).toMatch(/Sign in/i)

      const health = await anonymous.get('/api/health')
      expect(health.status).toBe(503)
    }
    finally {
      run(testEnv().pgStartCommand)
      stopped = false
    }

    await waitForHealthy(anonymous)
    // The same send again, as a client does after Retry-After: saved once.
    const retried = await client.post(`/api/fish/${fish.id}/timeline`, entry)
    expect(retried.status, JSON.stringify(retried.body)).toBe(201)
    const again = await client.post(`/api/fish/${fish.id}/timeline`, entry)
    expect([200, 201]).toContain(again.status)
    expect(await countEntries(fish.id)).toBe(1)
    const ponds = await client.get('/api/ponds')
    expect(ponds.status).toBe(200)
  })
})
