// npm run restore -- BACKUP.tar: puts a backup made by `npm run backup` into an empty database
// (NUXT_DATABASE_URL, e.g. on a freshly created cluster) and an empty storage folder (NUXT_STORAGE_DIR).
// Every byte is checked against the manifest before anything is written; a backup that does not match is refused.
import { execFileSync } from 'node:child_process'
import { createHash } from 'node:crypto'
import { copyFileSync, createReadStream, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join, normalize, resolve } from 'node:path'
import pg from 'pg'
import type { FileStorage } from '../server/storage/file-storage'
import { BACKUP_FOLDERS, MANIFEST_VERSION, bucketFromEnv, databaseUrlFromEnv, isAppObject, postgresTool, storageDirFromEnv, type BackupManifest } from './backup/common'

async function sha256Of(path: string) {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer)
  return hash.digest('hex')
}

async function verify(staging: string, manifest: BackupManifest) {
  const checks = [{ path: manifest.database.file, bytes: manifest.database.bytes, sha256: manifest.database.sha256, at: join(staging, manifest.database.file) },
    ...manifest.files.map(file => ({ ...file, at: join(staging, 'files', file.path) }))]
  for (const check of checks) {
    // A manifest path that climbs out of the backup is refused, not followed.
    if (normalize(check.path).startsWith('..') || !existsSync(check.at)) throw new Error(`the backup lacks ${check.path}`)
    if (statSync(check.at).size !== check.bytes || await sha256Of(check.at) !== check.sha256) throw new Error(`${check.path} does not match its checksum`)
  }
}

async function assertEmptyTargets(databaseUrl: string, storageDir: string, bucket: FileStorage | null) {
  const client = new pg.Client({ connectionString: databaseUrl })
  await client.connect()
  try {
    const { rows } = await client.query<{ n: number }>(`select count(*)::int as n from information_schema.tables where table_schema not in ('pg_catalog', 'information_schema')`)
    if (rows[0]!.n > 0) throw new Error('the target database is not empty: restore into a new database (createdb) or a fresh cluster')
  }
  finally {
    await client.end()
  }
  for await (const item of bucket ? bucket.list('') : []) {
    if (isAppObject(item.key)) throw new Error(`${bucket!.description} is not empty: restore into an empty bucket`)
  }
  for (const folder of bucket ? [] : BACKUP_FOLDERS) {
    const dir = join(storageDir, folder)
    if (existsSync(dir) && readdirSync(dir).length > 0) throw new Error(`${dir} is not empty: restore into an empty storage folder`)
  }
}

async function main() {
  const file = process.argv[2]
  if (!file) throw new Error('name the backup: npm run restore -- storage/backups/fintrail-....tar')
  const databaseUrl = databaseUrlFromEnv()
  const storageDir = storageDirFromEnv()
  const staging = mkdtempSync(join(tmpdir(), 'fintrail-restore-'))
  try {
    execFileSync('tar', ['-xf', resolve(file), '-C', staging, '--no-same-owner'])
    const manifest = JSON.parse(readFileSync(join(staging, 'manifest.json'), 'utf8')) as BackupManifest
    if (manifest.version !== MANIFEST_VERSION) throw new Error(`backup format ${manifest.version} is not known to this version`)
    await verify(staging, manifest)
    const bucket = bucketFromEnv()
    await assertEmptyTargets(databaseUrl, storageDir, bucket)

    execFileSync(postgresTool('pg_restore'), ['--no-owner', '--exit-on-error', '--dbname', databaseUrl, join(staging, manifest.database.file)], { stdio: ['ignore', 'inherit', 'inherit'] })
    const from = manifest.store ?? 'local'
    const to = bucket ? 's3' : 'local'
    for (const entry of manifest.files) {
      // Between a folder and a bucket only the photos move: unfinished uploads are kept differently by the two
      // tus stores (a finished one is the same bytes as its photo's original, which is restored).
      const isUpload = !entry.path.startsWith('photos/')
      if (from !== to && isUpload) continue
      if (bucket) {
        await bucket.putFile(entry.path, join(staging, 'files', entry.path))
        continue
      }
      const target = join(storageDir, entry.path)
      mkdirSync(dirname(target), { recursive: true })
      copyFileSync(join(staging, 'files', entry.path), target)
    }
    console.log(`Restored ${manifest.files.length} files and the database from ${file} (made ${manifest.createdAt}).`)
  }
  finally {
    rmSync(staging, { recursive: true, force: true })
  }
}

main().catch((error) => {
  console.error(`Restore failed: ${error instanceof Error ? error.message : error}`)
  process.exit(1)
})
