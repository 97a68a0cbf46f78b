import { execFile } from 'node:child_process'
import { promisify } from 'node:util'
import { ROOT } from './env'

const run = promisify(execFile)

/** Runs the start scripts' own PostgreSQL functions (scripts/lib/postgres.sh), so a test cluster is made like any other. */
async function postgresShell(script: string) {
  const { stdout } = await run('bash', ['-c', `set -euo pipefail; source scripts/lib/common.sh; source scripts/lib/postgres.sh; ${script}`], { cwd: ROOT })
  return stdout.trim().split('\n').at(-1) ?? ''
}

/** A private cluster `name` on `port` (created when missing) with an empty database `db` owned by the app's role. */
export function startCluster(name: string, port: number, db: string) {
  return postgresShell(`pg_cluster_start ${name} ${port} >/dev/null; pg_fresh_database ${port} ${db} >/dev/null; echo "$PGDATA_DIR"`)
}

/** Stops the cluster and deletes its data folder: everything in it is gone. */
export function destroyCluster(name: string) {
  return postgresShell(`pg_cluster_stop ${name} >/dev/null; pg_choose_data_dir ${name}; rm -rf "$PGDATA_DIR"; echo "$PGDATA_DIR"`)
}
