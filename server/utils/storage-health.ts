import { randomUUID } from 'node:crypto'
import { mkdir, unlink, writeFile } from 'node:fs/promises'
import { join } from 'node:path'

/** Writes and removes a small file: the only check that also holds for root and for full or read-only disks. */
export async function storageWritable(): Promise<boolean> {
  const probe = join(storageRoot(), `.write-probe-${randomUUID()}`)
  try {
    await mkdir(storageRoot(), { recursive: true })
    await writeFile(probe, 'ok')
    await unlink(probe)
    return true
  }
  catch {
    await unlink(probe).catch(() => {})
    return false
  }
}
