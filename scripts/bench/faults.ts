// Load and faults: 20 writers for 30 s with client-chosen entry ids against two instances; kill -9 one
// instance a third of the way in; stop PostgreSQL immediately at two thirds and start it again.
// Run with `bash scripts/bench/run.sh faults` (FAULTS_SECONDS, FAULTS_WRITERS to change the run).
import { execFileSync } from 'node:child_process'
import pg from 'pg'
import { durableUrl, runFaultScenario } from './fault-scenario'
import { record, startBenchServer } from './support'

const PORT = Number(process.env.BENCH_PORT ?? 3540)
const run = (command: string[]) => execFileSync(command[0]!, command.slice(1), { cwd: '/', stdio: 'ignore' })
const stopImmediately = (JSON.parse(process.env.BENCH_PG_STOP!) as string[]).map(part => (part === 'fast' ? 'immediate' : part))

async function main() {
  const db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 })
  db.on('error', () => { /* the database is stopped on purpose */ })
  const servers: { pid: number }[] = []
  const result = await runFaultScenario({
    seconds: Number(process.env.FAULTS_SECONDS ?? 30),
    writers: Number(process.env.FAULTS_WRITERS ?? 20),
    ports: [PORT, PORT + 1],
    start: async (port) => {
      // Warnings and errors only: a request line per write would bury the result.
      const server = await startBenchServer(port, { NUXT_DATABASE_URL: durableUrl(process.env.DATABASE_URL!), NUXT_LOG_LEVEL: 'warn' })
      servers.push(server)
      return { url: server.url, kill: () => process.kill(server.pid, 'SIGKILL') }
    },
    stopDatabase: () => run(stopImmediately),
    startDatabase: () => run(JSON.parse(process.env.BENCH_PG_START!) as string[]),
    db,
    log: line => console.log(`[faults] ${line}`),
  })
  for (const server of servers) {
    try {
      process.kill(server.pid, 'SIGTERM')
    }
    catch { /* already gone */ }
  }
  await db.end()
  const { instances: _, ...figures } = result
  console.log(`faults: ${JSON.stringify(figures)}`)
  record({
    what: `writes through a kill -9 and a PostgreSQL crash (${figures.seconds} s, two instances)`,
    figure: `${figures.acknowledged} acknowledged, ${figures.lost} lost, ${figures.doubled} doubled, ${figures.acknowledgedPerSecond} writes/s`,
    comparison: `${figures.requestsPerSecond} req/s sent, ${figures.refused} refused (${JSON.stringify(figures.refusedWith)}), ${figures.networkErrors} connection errors`,
    goal: '0 lost, 0 doubled',
    met: figures.lost === 0 && figures.doubled === 0,
  })
  if (result.lost || result.doubled) process.exit(1)
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
