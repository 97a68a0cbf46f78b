import type { TestProject } from 'vitest/node'
import { MAIN_PORT } from './env'
import { startServer, type RunningServer } from './server'

let server: RunningServer | undefined

export async function setup(_project: TestProject) {
  server = await startServer(MAIN_PORT)
}

export async function teardown() {
  await server?.stop()
}
