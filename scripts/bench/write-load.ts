// Writers with client-chosen entry ids, for the fault benchmark (scripts/bench/faults.ts) and its short
// versions in the tests: how many entries were acknowledged, and whether each is stored exactly once.
import { randomUUID } from 'node:crypto'
import type pg from 'pg'

export interface WriteLoadResult {
  acknowledged: string[]
  attempts: number
  refusals: number
  /** Refusals by HTTP status (503 while the database is away, for instance). */
  refusedWith: Record<number, number>
  networkErrors: number
  elapsedMs: number
}

/**
 * Writers that add observations with ids they choose, each sending one entry until an instance confirms
 * it (200 or 201), trying the next instance after a refused connection, a 503 or any other failure: what a
 * careful client behind a load balancer does. `baseUrls()` is read before every send (instances come and go).
 */
export async function runWriteLoad(options: { cookie: string, fishId: string, baseUrls: () => string[], writers: number, until: () => boolean }): Promise<WriteLoadResult> {
  const result: WriteLoadResult = { acknowledged: [], attempts: 0, refusals: 0, refusedWith: {}, networkErrors: 0, elapsedMs: 0 }
  const started = Date.now()
  let turn = 0
  const writer = async () => {
    while (!options.until()) {
      const id = randomUUID()
      const body = JSON.stringify({ id, kind: 'observation', occurredAt: new Date().toISOString().slice(0, 10), data: { signs: ['flashing'], text: `Load entry ${id.slice(0, 8)}` } })
      for (;;) {
        const urls = options.baseUrls()
        const url = urls[turn++ % Math.max(1, urls.length)]
        result.attempts++
        try {
          if (!url) throw new Error('no instance up')
          const response = await fetch(`${url}/api/fish/${options.fishId}/timeline`, {
            method: 'POST', body, headers: { 'content-type': 'application/json', 'accept': 'application/json', 'cookie': options.cookie },
          })
          await response.arrayBuffer()
          if (response.status === 200 || response.status === 201) {
            result.acknowledged.push(id)
            break
          }
          result.refusals++
          result.refusedWith[response.status] = (result.refusedWith[response.status] ?? 0) + 1
        }
        catch {
          result.networkErrors++
        }
        await new Promise(r => setTimeout(r, 50))
      }
    }
  }
  await Promise.all(Array.from({ length: options.writers }, writer))
  result.elapsedMs = Date.now() - started
  return result
}

/** What the database holds for the acknowledged ids: lost ones, and ids stored more than once. */
export async function checkAcknowledged(db: pg.Pool | pg.Client, fishId: string, acknowledged: string[]) {
  const { rows } = await db.query<{ id: string, n: number }>('select id::text as id, count(*)::int as n from timeline_entries where fish_id = $1 group by id', [fishId])
  const stored = new Map(rows.map(row => [row.id, row.n]))
  const lost = acknowledged.filter(id => !stored.has(id))
  const doubled = rows.filter(row => row.n > 1).length
  const known = new Set(acknowledged)
  // Stored although never confirmed: a writer moves on only after a confirmation, so this is a doubled write.
  const unacknowledged = rows.filter(row => !known.has(row.id)).length
  return { stored: rows.length, lost: lost.length, doubled, unacknowledged }
}
