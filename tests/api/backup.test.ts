import { execFile } from 'node:child_process'
import { randomUUID } from 'node:crypto'
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, relative } from 'node:path'
import { promisify } from 'node:util'
import pg from 'pg'
import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { destroyCluster, startCluster } from '../support/cluster'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT, ROOT, testEnv } from '../support/env'
import { TEST_PASSWORD, createFish, createPond, signedInUser } from '../support/factories'
import { fileSha256, makeJpeg, sha256, tusUpload } from '../support/photos'
import { startServer, type RunningServer } from '../support/server'
import { addEntry, sampleEntries } from '../support/timeline'

const run = promisify(execFile)
const scratch = mkdtempSync(join(tmpdir(), 'fintrail-backup-test-'))
const restoredDb = `fintrail_restored_${randomUUID().slice(0, 8)}`
const adminUrl = () => testEnv().databaseUrl.replace(/\/\/[^@]+@/, '//postgres@').replace(/\/[^/]+$/, '/postgres')
const restoredUrl = () => testEnv().databaseUrl.replace(/\/[^/]+$/, `/${restoredDb}`)

async function admin(sql: string) {
  const client = new pg.Client({ connectionString: adminUrl() })
  await client.connect()
  try {
    await client.query(sql)
  }
  finally {
    await client.end()
  }
}

let server: RunningServer | undefined

afterAll(async () => {
  await server?.stop()
  await admin(`drop database if exists ${restoredDb} with (force)`)
  rmSync(scratch, { recursive: true, force: true })
  await closeTestDb()
})

/** Every row of the record tables, in a stable order, as JSON text. */
async function records(pool: pg.Pool | pg.Client) {
  const tables = ['users', 'ponds', 'memberships', 'fish', 'timeline_entries', 'timeline_revisions', 'photos']
  const result: Record<string, string[]> = {}
  for (const table of tables) {
    const { rows } = await pool.query(`select row_to_json(t)::text as row from ${table} t order by 1`)
    result[table] = rows.map(r => r.row as string).sort()
  }
  return result
}

function filesUnder(root: string) {
  if (!existsSync(root)) return []
  return readdirSync(root, { recursive: true, withFileTypes: true }).filter(e => e.isFile()).map(e => relative(root, join(e.parentPath, e.name))).sort()
}

describe('backup and restore', () => {
  it('restores every pond, fish, entry and photo byte for byte into a new database and an empty folder', async () => {
    // A server with a storage folder of its own, so the backup holds this test's files rather than the whole run's.
    const storageDir = join(scratch, 'live')
    server = await startServer(MAIN_PORT + 11, { NUXT_STORAGE_DIR: storageDir })
    const { client: mainClient } = await signedInUser()
    const client = mainClient.copy()
    client.baseUrl = server.url
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    const other = await createFish(client, pond.id)
    const samples = sampleEntries(other.id)
    for (const entry of [samples.measurement, samples.observation, samples.problemSuspected]) await addEntry(client, fish.id, entry)
    const upload = await tusUpload(server.url, client, await makeJpeg(), { metadata: { fishId: fish.id, filename: 'backup.jpg', view: 'top' } }).done
    expect(upload.headers['photo-state']).toBe('ready')

    // Taken while the app runs and a person keeps writing.
    const backupFile = join(scratch, 'fintrail.tar')
    const env = { ...process.env, NUXT_DATABASE_URL: testEnv().databaseUrl, NUXT_STORAGE_DIR: storageDir }
    const writing = Promise.all(Array.from({ length: 5 }, () => addEntry(client, other.id, samples.observation)))
    await run(join(ROOT, 'node_modules/.bin/tsx'), ['scripts/backup.ts', backupFile], { cwd: ROOT, env })
    await writing
    const original = await records(testDb())
    const originalFiles = filesUnder(join(storageDir, 'photos'))

    const restoredStorage = join(scratch, 'storage')
    await admin(`create database ${restoredDb} owner fintrail`)
    await run(join(ROOT, 'node_modules/.bin/tsx'), ['scripts/restore.ts', backupFile], { cwd: ROOT, env: { ...env, NUXT_DATABASE_URL: restoredUrl(), NUXT_STORAGE_DIR: restoredStorage } })

    const restoredClient = new pg.Client({ connectionString: restoredUrl() })
    await restoredClient.connect()
    const restored = await records(restoredClient).finally(() => restoredClient.end())
    // Rows written during the backup may or may not be in it; every other row is there exactly as it was.
    const during = new Set((await testDb().query('select id::text from timeline_entries where fish_id = $1 and kind = $2', [other.id, 'observation'])).rows.map(r => r.id as string))
    for (const [table, rows] of Object.entries(original)) {
      const stable = (list: string[]) => list.filter(row => ![...during].some(id => row.includes(id)))
      expect(stable(restored[table]!), table).toEqual(stable(rows))
    }
    expect(restored.fish!.some(row => row.includes(fish.id))).toBe(true)
    expect(restored.photos!.some(row => row.includes(upload.headers['photo-id']!))).toBe(true)

    // The original and its six derived sizes.
    expect(originalFiles.filter(name => name.includes(upload.headers['photo-id']!))).toHaveLength(7)
    const restoredFiles = filesUnder(join(restoredStorage, 'photos'))
    expect(restoredFiles).toEqual(originalFiles)
    for (const name of restoredFiles) expect(fileSha256(join(restoredStorage, 'photos', name)), name).toBe(fileSha256(join(storageDir, 'photos', name)))

    // A second restore into the now-filled targets is refused rather than mixed in.
    await expect(run(join(ROOT, 'node_modules/.bin/tsx'), ['scripts/restore.ts', backupFile], { cwd: ROOT, env: { ...env, NUXT_DATABASE_URL: restoredUrl(), NUXT_STORAGE_DIR: restoredStorage } })).rejects.toThrow(/not empty/)
  }, 180_000) // two script runs and a server start; slow on a busy machine

  it('restores into a destroyed and recreated cluster and storage: every record and photo is there, served byte for byte', async () => {
    // A cluster of its own, so it can be destroyed: made by the same functions as the test and demo clusters.
    const cluster = 'backup-test'
    const pgPort = MAIN_PORT + 8
    const url = `postgres://fintrail@127.0.0.1:${pgPort}/fintrail`
    const storageDir = join(scratch, 'cluster-storage')
    const env = { ...process.env, NUXT_DATABASE_URL: url, DATABASE_URL: url, NUXT_STORAGE_DIR: storageDir }
    const serverEnv = { NUXT_DATABASE_URL: url, NUXT_STORAGE_DIR: storageDir, NUXT_JOBS_SCHEMA: 'pgboss' }
    const tsx = join(ROOT, 'node_modules/.bin/tsx')
    await destroyCluster(cluster)
    const dataDir = await startCluster(cluster, pgPort, 'fintrail')
    try {
      await run(tsx, ['scripts/migrate.ts'], { cwd: ROOT, env })
      let live = await startServer(MAIN_PORT + 12, serverEnv)
      const client = new ApiClient(live.url)
      const email = `restored-${randomUUID()}@example.test`
      const password = TEST_PASSWORD
      expect((await client.post('/api/auth/sign-up', { name: 'Restored Person', email, password })).status).toBe(201)
      const pond = await createPond(client)
      const fish = await createFish(client, pond.id)
      const samples = sampleEntries(fish.id)
      for (const entry of [samples.measurement, samples.observation]) await addEntry(client, fish.id, entry)
      const photo = await makeJpeg({ width: 900, height: 700 })
      const upload = await tusUpload(live.url, client, photo, { metadata: { fishId: fish.id, filename: 'survivor.jpg', view: 'top' } }).done
      expect(upload.headers['photo-state']).toBe('ready')
      const photoId = upload.headers['photo-id']!
      const servedBefore = Buffer.from(await (await fetch(`${live.url}/api/photos/${photoId}/1024.jpg`, { headers: { cookie: client.cookieHeader() } })).arrayBuffer())
      const before = await recordsAt(url)

      const backupFile = join(scratch, 'cluster.tar')
      await run(tsx, ['scripts/backup.ts', backupFile], { cwd: ROOT, env })
      await live.stop()

      // The machine is lost: the cluster's data folder and the storage folder are gone.
      await destroyCluster(cluster)
      rmSync(storageDir, { recursive: true, force: true })
      expect(existsSync(dataDir)).toBe(false)

      // A new cluster in the same place (initdb again), an empty database, then the restore and a start.
      await startCluster(cluster, pgPort, 'fintrail')
      await run(tsx, ['scripts/restore.ts', backupFile], { cwd: ROOT, env })
      expect(await recordsAt(url)).toEqual(before)
      live = await startServer(MAIN_PORT + 12, serverEnv)
      try {
        const again = new ApiClient(live.url)
        expect((await again.post('/api/auth/sign-in', { email, password })).status).toBe(200)
        expect((await again.get(`/api/ponds/${pond.id}`)).status).toBe(200)
        const timeline = await again.get(`/api/fish/${fish.id}/timeline`)
        expect(timeline.status).toBe(200)
        expect(JSON.stringify(timeline.body)).toContain('measurement')
        const servedAfter = await fetch(`${live.url}/api/photos/${photoId}/1024.jpg`, { headers: { cookie: again.cookieHeader() } })
        expect(servedAfter.status).toBe(200)
        expect(Buffer.from(await servedAfter.arrayBuffer()).equals(servedBefore)).toBe(true)
        expect(fileSha256(join(storageDir, 'photos', 'originals', photoId))).toBe(sha256(photo))
      }
      finally {
        await live.stop()
      }
    }
    finally {
      await destroyCluster(cluster)
    }
  }, 300_000) // two clusters made, migrations, two server starts, two script runs
})

async function recordsAt(url: string) {
  const client = new pg.Client({ connectionString: url })
  await client.connect()
  try {
    return await records(client)
  }
  finally {
    await client.end()
  }
}
