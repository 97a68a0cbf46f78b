import { ERRORS, MemoryLocker, type Lock, type Locker, type RequestRelease } from '@tus/server'
import pg from 'pg'

// @tus/server's own locker lives in one process's memory: with several instances on one storage folder, two
// PATCHes of one upload (a client resuming on another instance while its old request still hangs) could write
// at once. This one takes a PostgreSQL advisory lock per upload, held on a connection of its own while the
// request runs, and asks the holder to let go (NOTIFY, heard by every instance) as tus expects. Requests of one
// process first queue in tus's own memory lock, so a resume on the same instance behaves exactly as before.
const RELEASE_CHANNEL = 'fintrail_tus_release'
const ACQUIRE_TIMEOUT_MS = 20_000
const RETRY_MS = 100

let lockPool: pg.Pool | undefined
let listener: Promise<pg.Client> | undefined
/** Release requests of the uploads this process holds, by upload id. */
const holders = new Map<string, RequestRelease>()

function pool() {
  if (!lockPool) {
    const url = useRuntimeConfig().databaseUrl || process.env.DATABASE_URL
    // One connection per upload being written: kept apart from the app's pool so uploads never starve requests.
    lockPool = new pg.Pool({ connectionString: String(url), max: 20, connectionTimeoutMillis: 3000, idleTimeoutMillis: 10_000 })
    lockPool.on('error', error => console.error('[uploads] lock connection lost:', error.message))
  }
  return lockPool
}

function listen() {
  listener ??= (async () => {
    const client = new pg.Client({ connectionString: String(useRuntimeConfig().databaseUrl || process.env.DATABASE_URL) })
    client.on('error', (error) => {
      console.error('[uploads] lock listener lost:', error.message)
      listener = undefined
    })
    client.on('notification', message => holders.get(message.payload ?? '')?.())
    await client.connect()
    await client.query(`listen ${RELEASE_CHANNEL}`)
    return client
  })().catch((error) => {
    listener = undefined
    throw error
  })
  return listener
}

class PostgresLock implements Lock {
  private client: pg.PoolClient | undefined
  constructor(private readonly id: string, private readonly local: Lock) {}

  async lock(stopSignal: AbortSignal, requestRelease: RequestRelease) {
    await this.local.lock(stopSignal, requestRelease)
    try {
      await this.lockAcrossInstances(stopSignal, requestRelease)
    }
    catch (error) {
      await this.local.unlock()
      throw error
    }
  }

  private async lockAcrossInstances(stopSignal: AbortSignal, requestRelease: RequestRelease) {
    // Without the listener locks still hold; only the holder's early release is lost.
    await listen().catch(error => console.error('[uploads] lock listener not started:', error.message))
    const client = await pool().connect()
    const deadline = Date.now() + ACQUIRE_TIMEOUT_MS
    let asked = false
    try {
      for (;;) {
        const { rows } = await client.query<{ locked: boolean }>('select pg_try_advisory_lock(hashtextextended($1, 0)) as locked', [`tus:${this.id}`])
        if (rows[0]?.locked) break
        if (!asked) {
          await client.query('select pg_notify($1, $2)', [RELEASE_CHANNEL, this.id])
          asked = true
        }
        if (stopSignal.aborted || Date.now() > deadline) throw ERRORS.ERR_LOCK_TIMEOUT
        await new Promise(resolve => setTimeout(resolve, RETRY_MS))
      }
    }
    catch (error) {
      client.release()
      throw error
    }
    this.client = client
    holders.set(this.id, requestRelease)
  }

  async unlock() {
    const client = this.client
    if (!client) throw new Error('Releasing an unlocked lock!')
    this.client = undefined
    holders.delete(this.id)
    try {
      await client.query('select pg_advisory_unlock(hashtextextended($1, 0))', [`tus:${this.id}`])
      client.release()
    }
    catch (error) {
      // A connection that cannot unlock is thrown away: closing it ends its advisory locks.
      client.release(error as Error)
    }
    finally {
      await this.local.unlock()
    }
  }
}

export class PostgresLocker implements Locker {
  private readonly local = new MemoryLocker({ acquireLockTimeout: ACQUIRE_TIMEOUT_MS })
  newLock(id: string): Lock {
    return new PostgresLock(id, this.local.newLock(id))
  }
}

export async function closeUploadLocks() {
  const client = await listener?.catch(() => undefined)
  listener = undefined
  await client?.end().catch(() => {})
  await lockPool?.end().catch(() => {})
  lockPool = undefined
}
