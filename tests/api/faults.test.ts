import { spawnSync } from 'node:child_process'
import { afterAll, describe, expect, it } from 'vitest'
import { durableUrl, runFaultScenario } from '../../scripts/bench/fault-scenario'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT, testEnv } from '../support/env'
import { startServer, type RunningServer } from '../support/server'

// The short version of scripts/bench/faults.ts. It stops the test cluster's PostgreSQL (immediate mode, as a
// crash), which every test file shares: vitest runs files one at a time, and the cluster is started again
// (and, should the test fail half-way, in afterAll) before the file ends.
function run(command: string[]) {
  const result = spawnSync(command[0]!, command.slice(1), { cwd: '/', encoding: 'utf8' })
  if (result.status !== 0) throw new Error(`${command.join(' ')} failed: ${result.stderr}`)
}
const servers: RunningServer[] = []

afterAll(async () => {
  spawnSync(testEnv().pgStartCommand[0]!, testEnv().pgStartCommand.slice(1), { cwd: '/' }) // no-op when it runs
  for (const server of servers) await server.stop()
  await closeTestDb()
})

describe('writes under faults', () => {
  it('keeps every acknowledged entry exactly once through a kill -9 and a PostgreSQL crash', async () => {
    testDb().on('error', () => { /* the database is stopped on purpose */ })
    const result = await runFaultScenario({
      seconds: 9,
      writers: 6,
      ports: [MAIN_PORT + 16, MAIN_PORT + 17],
      start: async (port) => {
        const server = await startServer(port, { NUXT_DATABASE_URL: durableUrl(testEnv().databaseUrl) })
        servers.push(server)
        return { url: server.url, kill: () => server.kill() }
      },
      stopDatabase: () => run(testEnv().pgStopCommand.map(part => (part === 'fast' ? 'immediate' : part))),
      startDatabase: () => run(testEnv().pgStartCommand),
      db: testDb(),
      log: line => console.log(`[faults] ${new Date().toISOString()} ${line}`),
    })
    const { instances: _, ...figures } = result
    console.log(`[faults] ${JSON.stringify(figures)}`)
    // A busy machine gets few writes through; what matters is that some went through before and after the faults.
    expect(result.acknowledged).toBeGreaterThan(10)
    expect(result).toMatchObject({ lost: 0, doubled: 0, stored: result.acknowledged })
  }, 240_000) // three server starts and a database restart; slow on a busy machine
})
