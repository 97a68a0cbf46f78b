import pg from 'pg'
import { testEnv } from './env'

let pool: pg.Pool | undefined

/** Direct access to the test database, for factories and for checking what a request did or did not write. */
export function testDb() {
  pool ??= new pg.Pool({ connectionString: testEnv().databaseUrl, max: 3 })
  return pool
}

export async function closeTestDb() {
  await pool?.end()
  pool = undefined
}
