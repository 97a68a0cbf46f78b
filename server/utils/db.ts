import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import * as schema from '../db/schema'

export { schema }

let pool: pg.Pool | undefined
let database: ReturnType<typeof drizzle<typeof schema>> | undefined

export function usePool() {
  if (!pool) {
    const url = useRuntimeConfig().databaseUrl || process.env.DATABASE_URL
    if (!url) throw new Error('NUXT_DATABASE_URL is not set')
    pool = new pg.Pool({ connectionString: url, max: 10, connectionTimeoutMillis: 3000, idleTimeoutMillis: 30_000 })
    // An idle client losing its server (database restarted) must not crash the process.
    pool.on('error', err => console.error('[db] idle client error:', err.message))
  }
  return pool
}

export function useDb() {
  database ??= drizzle(usePool(), { schema })
  return database
}

export type Db = ReturnType<typeof useDb>
export type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
