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

// File-system errors that say "the storage cannot be written" rather than "this file is bad".
const STORAGE_FAULT_CODES = new Set(['EACCES', 'EPERM', 'EROFS', 'ENOSPC', 'EDQUOT', 'ENOTDIR', 'EEXIST', 'EIO'])

export function isStorageFault(error: unknown): boolean {
  const code = (error as NodeJS.ErrnoException)?.code
  return typeof code === 'string' && STORAGE_FAULT_CODES.has(code)
}

export function storageUnavailableMessage(error: unknown) {
  const code = (error as NodeJS.ErrnoException)?.code ?? 'unknown'
  return `The server cannot store files right now: its storage folder is not writable (${code}). Nothing was saved; try again later, and tell the administrator if it lasts.`
}
