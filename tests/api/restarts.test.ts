import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs'
import { request } from 'node:http'
import { createServer } from 'node:net'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import pg from 'pg'
import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT, testEnv } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'
import { ALL_DERIVED, TUS, createUpload, makeJpeg, photoRows, sha256, tusUpload } from '../support/photos'
import { startServer, type RunningServer } from '../support/server'
import { checkAcknowledged, runWriteLoad } from '../../scripts/bench/write-load'

const servers: RunningServer[] = []
afterAll(async () => {
  for (const server of servers) await server.stop()
  await closeTestDb()
})

async function serverOn(port: number, env: Record<string, string> = {}, options: { cluster?: boolean } = {}) {
  const server = await startServer(port, env, options)
  servers.push(server)
  return server
}

const pause = (ms: number) => new Promise(r => setTimeout(r, ms))

describe('graceful restarts', () => {
  it('on SIGTERM takes no new request, finishes the one in flight and exits', async () => {
    const server = await serverOn(MAIN_PORT + 13)
    const { client } = await signedInUser()
    const here = client.copy()
    here.baseUrl = server.url
    const pond = await createPond(here)
    const fish = await createFish(here, pond.id)
    const photo = await makeJpeg({ width: 1600, height: 1200 })
    const { location } = await createUpload(server.url, here, photo.length, { fishId: fish.id, filename: 'during-restart.jpg', view: 'top' })

    // A slow PATCH from a weak connection: a third of the bytes, then the signal, then the rest.
    const answer = new Promise<{ status: number, state: string | undefined }>((resolve, reject) => {
      const patch = request(new URL(location, server.url), {
        method: 'PATCH',
        headers: { 'cookie': here.cookieHeader(), 'Tus-Resumable': TUS, 'Upload-Offset': '0', 'Content-Type': 'application/offset+octet-stream', 'Content-Length': String(photo.length) },
      }, (response) => {
        response.resume()
        response.on('end', () => resolve({ status: response.statusCode!, state: response.headers['photo-state'] as string | undefined }))
      })
      patch.on('error', reject)
      const third = Math.floor(photo.length / 3)
      patch.write(photo.subarray(0, third))
      setTimeout(async () => {
        server.process.kill('SIGTERM')
        await pause(500)
        patch.end(photo.subarray(third))
      }, 300)
    })
    const exited = new Promise<number | null>(resolve => server.process.once('exit', code => resolve(code)))

    await pause(600)
    // The listener is closed: a new connection is refused while the upload is still being received.
    await expect(fetch(`${server.url}/api/health`)).rejects.toThrow()
    const finished = await answer
    expect(finished).toEqual({ status: 204, state: 'ready' })
    expect(await exited).toBe(0)
  }, 120_000)

  it('a rolling restart of two instances under write load loses and doubles nothing', async () => {
    const first = await serverOn(MAIN_PORT + 14)
    const second = await serverOn(MAIN_PORT + 15)
    const { client } = await signedInUser()
    const pond = await createPond(client)
    const fish = await createFish(client, pond.id)
    const up = new Map([[first.url, first], [second.url, second]])
    let done = false
    const load = runWriteLoad({ cookie: client.cookieHeader(), fishId: fish.id, baseUrls: () => [...up.keys()], writers: 6, until: () => done })

    // Each instance in turn: out of the pool, SIGTERM, a new process on its port, back in the pool.
    for (const port of [MAIN_PORT + 14, MAIN_PORT + 15]) {
      await pause(800)
      const url = `http://127.0.0.1:${port}`
      const old = up.get(url)!
      await old.stop()
      up.delete(url)
      const fresh = await serverOn(port)
      up.set(url, fresh)
    }
    await pause(800)
    done = true
    const result = await load
    expect(result.acknowledged.length).toBeGreaterThan(20)
    const check = await checkAcknowledged(testDb(), fish.id, result.acknowledged)
    expect(check).toEqual({ stored: result.acknowledged.length, lost: 0, doubled: 0, unacknowledged: 0 })
  }, 240_000) // four server starts; slow on a busy machine

  it('a job running when its instance gets SIGTERM is handed back and finished once by the other instance', async () => {
    // A and B share a storage folder and a job queue of their own (the main test server must not take the job).
    const storage = mkdtempSync(join(tmpdir(), 'fintrail-handback-'))
    const shared = { NUXT_STORAGE_DIR: storage, NUXT_JOBS_SCHEMA: 'pgboss_handback', NUXT_PHOTO_RETRY_DELAY_SECONDS: '2', NUXT_JOBS_STOP_GRACE_SECONDS: '1' }
    // The derived-sizes folder is a file: A's first attempt fails and queues the retry job.
    mkdirSync(join(storage, 'photos'), { recursive: true })
    writeFileSync(join(storage, 'photos', 'derived'), 'not a folder')
    const a = await serverOn(MAIN_PORT + 11, shared)
    const { client } = await signedInUser()
    const here = client.copy()
    here.baseUrl = a.url
    const fish = await createFish(here, (await createPond(here)).id)
    const photo = await makeJpeg({ width: 1600, height: 1200 })
    const { headers } = await tusUpload(a.url, here, photo, { metadata: { fishId: fish.id, filename: 'handed-back.jpg', view: 'top' } }).done
    expect(headers['photo-state']).toBe('failed')
    const photoId = headers['photo-id']!
    rmSync(join(storage, 'photos', 'derived'))

    // The job's first write to the photo waits on this row lock: the job stays running on A for as long as we hold it.
    const holder = new pg.Client({ connectionString: testEnv().databaseUrl })
    await holder.connect()
    const jobState = async () => (await testDb().query<{ state: string, retry_count: number }>('select state, retry_count from pgboss_handback.job where name = $1 and data->>\'photoId\' = $2', ['photo-retry', photoId])).rows
    try {
      await holder.query('begin')
      await holder.query('select id from photos where id = $1 for update', [photoId])
      for (let i = 0; i < 300 && (await jobState())[0]?.state !== 'active'; i++) await pause(100)
      expect(await jobState()).toEqual([{ state: 'active', retry_count: 0 }])

      const b = await serverOn(MAIN_PORT + 12, shared)
      const exited = new Promise<number | null>(resolve => a.process.once('exit', code => resolve(code)))
      a.process.kill('SIGTERM')
      expect(await exited).toBe(0)
      // Handed back: failed by A's shutdown, waiting for (or already taken by) B, one attempt used.
      // (pg-boss counts the attempt when the job is taken again.)
      expect([[{ state: 'retry', retry_count: 0 }], [{ state: 'active', retry_count: 1 }]]).toContainEqual(await jobState())
      await holder.query('commit')

      // A's UPDATE, sent before it stopped, may still run once the lock is gone (a backend waiting on a lock does not
      // notice its client left): the job on B then finds the photo pending and finishes it all the same.
      for (let i = 0; i < 600 && (await jobState())[0]?.state !== 'completed'; i++) await pause(100)
      const [finished] = await jobState()
      expect(finished?.state).toBe('completed')
      expect(finished?.retry_count).toBeGreaterThanOrEqual(1)
      const rows = await photoRows('fish_id = $1', [fish.id])
      expect(rows).toHaveLength(1)
      expect(rows[0]).toMatchObject({ id: photoId, state: 'ready', sha256: sha256(photo) })
      expect(rows[0]!.variants).toHaveLength(6)
      expect(readdirSync(join(storage, 'photos', 'derived', photoId)).sort()).toEqual(ALL_DERIVED)
      expect(b.process.exitCode).toBeNull()
    }
    finally {
      await holder.query('rollback').catch(() => undefined)
      await holder.end()
      await testDb().query('update fish set profile_photo_id = null where id = $1', [fish.id])
      await testDb().query('delete from photos where fish_id = $1', [fish.id])
      rmSync(storage, { recursive: true, force: true })
    }
  }, 180_000)

  it.each([
    ['one process', false],
    ['npm start\'s cluster of one process per core', true],
  ])('exits with an error when its port is taken, instead of running on with no port (%s)', async (_name, cluster) => {
    // Another program on the port: a plain TCP listener that answers nothing.
    const squatter = createServer(socket => socket.destroy())
    const port = MAIN_PORT + 20
    await new Promise<void>(done => squatter.listen(port, '127.0.0.1', done))
    try {
      const started = Date.now()
      const failure = await serverOn(port, {}, { cluster }).then(() => null, (error: Error) => error)
      expect(failure?.message).toMatch(/server exited early \(status 1\)/)
      expect(failure?.message).toContain(`The server cannot start: port ${port} is in use by another program`)
      expect(Date.now() - started).toBeLessThan(30_000)
    }
    finally {
      squatter.close()
    }
  })
})
