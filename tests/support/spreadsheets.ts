import { deflateRawSync } from 'node:zlib'
import type { ApiClient } from './client'
import { MAIN_URL } from './env'

/** Sends a file as a browser form would (multipart), with the client's cookies. */
export async function uploadSheet(client: ApiClient, path: string, file: { name: string, data: Buffer | string, type?: string }, fields: Record<string, unknown> = {}) {
  const form = new FormData()
  form.set('file', new Blob([typeof file.data === 'string' ? file.data : new Uint8Array(file.data)], { type: file.type ?? 'text/csv' }), file.name)
  for (const [key, value] of Object.entries(fields)) form.set(key, typeof value === 'string' ? value : JSON.stringify(value))
  const send = () => fetch(MAIN_URL + path, { method: 'POST', headers: client.cookies.size ? { cookie: client.cookieHeader() } : {}, body: form })
  // A test that just spent seconds building a file synchronously may reuse a pooled connection the server
  // closed for idleness meanwhile (its keep-alive timeout is 5 s): the write then fails before any byte
  // reached a handler, so sending once more is safe.
  const response = await send().catch((error: Error & { cause?: { code?: string } }) => {
    if (['EPIPE', 'ECONNRESET', 'UND_ERR_SOCKET'].includes(error.cause?.code ?? '')) return send()
    throw error
  })
  const text = await response.text()
  let body: any // eslint-disable-line @typescript-eslint/no-explicit-any
  try {
    body = JSON.parse(text)
  }
  catch {
    body = text
  }
  return { status: response.status, body }
}

/**
 * A zip written by hand, so a test can make one that lies: `declaredSize` replaces the true unpacked
 * size in both headers (a zip bomb understates it).
 */
export function handMadeZip(entries: { name: string, data: Buffer, declaredSize?: number }[]) {
  const locals: Buffer[] = []
  const centrals: Buffer[] = []
  let offset = 0
  for (const entry of entries) {
    const packed = deflateRawSync(entry.data)
    const name = Buffer.from(entry.name)
    const size = entry.declaredSize ?? entry.data.length
    const local = Buffer.alloc(30)
    local.writeUInt32LE(0x04034b50, 0)
    local.writeUInt16LE(20, 4)
    local.writeUInt16LE(8, 8)
    local.writeUInt32LE(packed.length, 18)
    local.writeUInt32LE(size, 22)
    local.writeUInt16LE(name.length, 26)
    const central = Buffer.alloc(46)
    central.writeUInt32LE(0x02014b50, 0)
    central.writeUInt16LE(20, 4)
    central.writeUInt16LE(20, 6)
    central.writeUInt16LE(8, 10)
    central.writeUInt32LE(packed.length, 20)
    central.writeUInt32LE(size, 24)
    central.writeUInt16LE(name.length, 28)
    central.writeUInt32LE(offset, 42)
    locals.push(local, name, packed)
    centrals.push(central, name)
    offset += local.length + name.length + packed.length
  }
  const directory = Buffer.concat(centrals)
  const end = Buffer.alloc(22)
  end.writeUInt32LE(0x06054b50, 0)
  end.writeUInt16LE(entries.length, 8)
  end.writeUInt16LE(entries.length, 10)
  end.writeUInt32LE(directory.length, 12)
  end.writeUInt32LE(offset, 16)
  return Buffer.concat([...locals, directory, end])
}
