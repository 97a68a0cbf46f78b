/** Writes and removes a small object: the only check that also holds for root, full disks and read-only buckets. */
export function storageWritable(): Promise<boolean> {
  return useFileStorage().writable()
}

// File-system errors that say "the storage cannot be written" rather than "this file is bad"; ESTORAGE is an
// object store that could not be reached or refused the request (server/storage/s3-storage.ts).
const STORAGE_FAULT_CODES = new Set(['EACCES', 'EPERM', 'EROFS', 'ENOSPC', 'EDQUOT', 'ENOTDIR', 'EEXIST', 'EIO', 'ESTORAGE'])

export function isStorageFault(error: unknown): boolean {
  const code = (error as NodeJS.ErrnoException)?.code
  return typeof code === 'string' && STORAGE_FAULT_CODES.has(code)
}

export function storageUnavailableMessage(error: unknown) {
  const code = (error as NodeJS.ErrnoException)?.code ?? 'unknown'
  const what = code === 'ESTORAGE' ? 'its object store cannot be reached' : `its storage folder is not writable (${code})`
  return `The server cannot store files right now: ${what}. Nothing was saved; try again later, and tell the administrator if it lasts.`
}
