// The fault scenario of scripts/bench/faults.ts (and, shorter, of tests/api/faults.test.ts): writers with
// client-chosen ids against two instances; one instance is killed with SIGKILL a third of the way in and
// started again; at two thirds PostgreSQL is stopped at once (immediate mode, as a crash) and started again.
// Afterwards every acknowledged entry must exist exactly once.
// The instances must run with synchronous_commit on (production's default): a test or bench cluster that
// turns it off for speed would lose the last commits in the crash, acknowledged or not (`durableUrl`).
import { randomUUID } from 'node:crypto'
import type pg from 'pg'
import { checkAcknowledged, runWriteLoad } from './write-load'

export interface Instance { url: string, kill: () => Promise<void> | void }

export interface FaultScenario {
  seconds: number
  writers: number
  ports: [number, number]
  start: (port: number) => Promise<Instance>
  stopDatabase: () => void
  startDatabase: () => void
  /** A pool on the app's database, for the final check (it must survive the database restart). */
  db: pg.Pool
  log?: (line: string) => void
}

/** The database URL with commits that survive a PostgreSQL crash, whatever the cluster's default. */
export function durableUrl(url: string) {
  const parsed = new URL(url)
  parsed.searchParams.set('options', '-c synchronous_commit=on')
  return parsed.toString()
}

const pause = (ms: number) => new Promise(r => setTimeout(r, ms))

async function signedUpFish(url: string) {
  const email = `faults-${randomUUID().slice(0, 8)}@bench.example`
  const signUp = await fetch(`${url}/api/auth/sign-up`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ name: 'Fault Writer', email, password: 'writers-by-the-pond-edge' }) })
  if (signUp.status !== 201) throw new Error(`sign-up answered ${signUp.status}`)
  const cookie = signUp.headers.getSetCookie().map(c => c.split(';')[0]).join('; ')
  const post = async (path: string, body: unknown) => {
    const response = await fetch(`${url}${path}`, { method: 'POST', headers: { 'content-type': 'application/json', cookie }, body: JSON.stringify(body) })
    if (response.status !== 201) throw new Error(`${path} answered ${response.status}`)
    return response.json() as Promise<{ id: string }>
  }
  const pond = await post('/api/ponds', { name: 'Fault pond', volumeLitres: 8000 })
  const fish = await post(`/api/ponds/${pond.id}/fish`, { name: 'Fault koi', species: 'koi', variety: 'Showa', hatchYear: 2019 })
  return { cookie, fishId: fish.id }
}

export async function runFaultScenario(scenario: FaultScenario) {
  const log = scenario.log ?? (() => {})
  const [firstPort, secondPort] = scenario.ports
  const first = await scenario.start(firstPort)
  const second = await scenario.start(secondPort)
  const { cookie, fishId } = await signedUpFish(first.url)
  // The balancer keeps sending to a dead instance until it notices: the writers find out themselves and move on.
  const urls = [first.url, second.url]
  let done = false
  const load = runWriteLoad({ cookie, fishId, baseUrls: () => urls, writers: scenario.writers, until: () => done })
  const started = Date.now()
  const at = (fraction: number) => pause(Math.max(0, started + scenario.seconds * 1000 * fraction - Date.now()))

  await at(1 / 3)
  log(`kill -9 the instance on port ${firstPort}`)
  await first.kill()
  const restarted = await scenario.start(firstPort)
  log(`instance on port ${firstPort} started again`)

  await at(2 / 3)
  log('PostgreSQL stopped (immediate)')
  scenario.stopDatabase()
  await pause(2000)
  scenario.startDatabase()
  log('PostgreSQL started again')

  await at(1)
  done = true
  const result = await load
  const check = await checkAcknowledged(scenario.db, fishId, result.acknowledged)
  const seconds = result.elapsedMs / 1000
  return {
    instances: [restarted, second],
    acknowledged: result.acknowledged.length,
    lost: check.lost,
    doubled: check.doubled + check.unacknowledged,
    stored: check.stored,
    attempts: result.attempts,
    refused: result.refusals,
    refusedWith: result.refusedWith,
    networkErrors: result.networkErrors,
    seconds: Math.round(seconds * 10) / 10,
    acknowledgedPerSecond: Math.round(result.acknowledged.length / seconds),
    requestsPerSecond: Math.round(result.attempts / seconds),
  }
}
