// npm run backup [-- OUTPUT.tar]: a consistent snapshot of a running Fintrail, in one tar file:
//   database.dump  pg_dump in custom format (one MVCC snapshot of every table, taken without stopping the app)
//   files/         the stored files (uploads, photos and their derived sizes), hard-linked first, then packed
//   manifest.json  what is inside, with the SHA-256 and size of every file, checked again on restore
// The database is dumped first: files are written before the rows that point at them, and photos are only ever
// added or purged 30 days after removal, so every file a dumped row names is already in the folder when it is read.
import { execFileSync } from 'node:child_process'
import { createHash } from 'node:crypto'
import { createReadStream, createWriteStream, existsSync, linkSync, mkdirSync, mkdtempSync, readdirSync, rmSync, statSync, writeFileSync, copyFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join, relative, resolve } from 'node:path'
import { pipeline } from 'node:stream/promises'
import { BACKUP_FOLDERS, MANIFEST_VERSION, bucketFromEnv, isAppObject, postgresTool, storageDirFromEnv, databaseUrlFromEnv, type BackupManifest } from './backup/common'

async function sha256Of(path: string) {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer)
  return hash.digest('hex')
}

function filesUnder(root: string): string[] {
  if (!existsSync(root)) return []
  return readdirSync(root, { recursive: true, withFileTypes: true })
    .filter(entry => entry.isFile())
    .map(entry => join(entry.parentPath, entry.name))
}

async function main() {
  const databaseUrl = databaseUrlFromEnv()
  const storageDir = storageDirFromEnv()
  const output = resolve(process.argv[2] ?? join(storageDir, 'backups', `fintrail-${new Date().toISOString().replace(/[:.]/g, '-')}.tar`))
  const staging = mkdtempSync(join(tmpdir(), 'fintrail-backup-'))
  try {
    execFileSync(postgresTool('pg_dump'), ['--format=custom', '--no-owner', '--file', join(staging, 'database.dump'), databaseUrl], { stdio: ['ignore', 'inherit', 'inherit'] })

    const files: BackupManifest['files'] = []
    const bucket = bucketFromEnv()
    // Objects are immutable once written (a new set of sizes replaces keys whole), so a copy made now is consistent.
    for await (const item of bucket ? bucket.list('') : []) {
      if (!isAppObject(item.key)) continue
      const target = join(staging, 'files', item.key)
      mkdirSync(dirname(target), { recursive: true })
      try {
        await pipeline(await bucket!.read(item.key), createWriteStream(target))
      }
      catch (error) {
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') continue // removed since it was listed
        throw error
      }
      files.push({ path: item.key, bytes: statSync(target).size, sha256: await sha256Of(target) })
    }
    for (const folder of bucket ? [] : BACKUP_FOLDERS) {
      for (const source of filesUnder(join(storageDir, folder))) {
        const name = relative(storageDir, source)
        const target = join(staging, 'files', name)
        mkdirSync(dirname(target), { recursive: true })
        // A hard link is instant and keeps the bytes even if the app deletes the file meanwhile; across devices, a copy.
        try {
          linkSync(source, target)
        }
        catch (error) {
          if ((error as NodeJS.ErrnoException).code === 'ENOENT') continue // removed since it was listed
          copyFileSync(source, target)
        }
        files.push({ path: name, bytes: statSync(target).size, sha256: await sha256Of(target) })
      }
    }
    const manifest: BackupManifest = {
      version: MANIFEST_VERSION,
      createdAt: new Date().toISOString(),
      database: { file: 'database.dump', bytes: statSync(join(staging, 'database.dump')).size, sha256: await sha256Of(join(staging, 'database.dump')) },
      files,
      store: bucket ? 's3' : 'local',
    }
    writeFileSync(join(staging, 'manifest.json'), `${JSON.stringify(manifest, null, 2)}\n`)
    mkdirSync(dirname(output), { recursive: true })
    execFileSync('tar', ['-cf', output, '-C', staging, '.'])
    console.log(`Backup written: ${output} (${files.length} files${bucket ? ` from ${bucket.description}` : ''}, database ${manifest.database.bytes} bytes)`)
  }
  finally {
    rmSync(staging, { recursive: true, force: true })
  }
}

main().catch((error) => {
  console.error(`Backup failed: ${error instanceof Error ? error.message : error}`)
  process.exit(1)
})
