import { request } from 'node:http'
import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_PORT } from '../support/env'
import { createFish, createPond, signedInUser } from '../support/factories'
import { TUS, createUpload, makeJpeg } from '../support/photos'
import { startServer, type RunningServer } from '../support/server'
import { checkAcknowledged, runWriteLoad } from '../../scripts/bench/write-load'

const servers: RunningServer[] = []
afterAll(async () => {
  for (const server of servers) await server.stop()
  await closeTestDb()
})

async function serverOn(port: number) {
  const server = await startServer(port)
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
})
