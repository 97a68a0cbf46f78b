import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT } from '../support/env'
import { startServer, type RunningServer } from '../support/server'

// Instances started at the same moment on a database whose job tables do not exist yet create them together,
// and PostgreSQL may end one of them with "deadlock detected". Each must try again until its job runner runs:
// an instance without one would never take a photo or mail job (found with `npm start`, which starts one
// process per core).
const schema = `pgboss_together_${Date.now() % 100_000}`
const servers: RunningServer[] = []

afterAll(async () => {
  await Promise.all(servers.map(server => server.stop()))
  await testDb().query(`drop schema if exists ${schema} cascade`)
  await closeTestDb()
})

describe('instances started together', () => {
  it('each run their job runner, trying again when creating its tables at once failed', { timeout: 120_000 }, async () => {
    servers.push(...await Promise.all([
      startServer(MAIN_PORT + 8, { NUXT_JOBS_SCHEMA: schema }),
      startServer(MAIN_PORT + 9, { NUXT_JOBS_SCHEMA: schema }),
    ]))
    await expect.poll(() => servers.map(server => server.output().includes('[jobs] running')), { timeout: 90_000, interval: 500 }).toEqual([true, true])
    const { rows } = await testDb().query(`select count(*)::int as queues from ${schema}.queue`)
    expect(rows[0].queues).toBeGreaterThan(0)
  })
})
