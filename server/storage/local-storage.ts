import { randomBytes, randomUUID } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { copyFile, link, mkdir, readdir, readFile, rename, rm, stat, unlink, writeFile } from 'node:fs/promises'
import { dirname, join, relative, sep } from 'node:path'
import type { FileStorage, StoredObject } from './file-storage'

/** Files under one folder (NUXT_STORAGE_DIR): the default, and what several instances share over NFS. */
export function localStorage(root: string): FileStorage {
  const pathOf = (key: string) => join(root, ...key.split('/'))

  async function* walk(folder: string): AsyncGenerator<StoredObject> {
    const entries = await readdir(folder, { withFileTypes: true }).catch(() => [])
    for (const entry of entries) {
      const path = join(folder, entry.name)
      if (entry.isDirectory()) {
        yield* walk(path)
        continue
      }
      const info = await stat(path).catch(() => null)
      if (info?.isFile()) yield { key: relative(root, path).split(sep).join('/'), size: info.size, modified: info.mtime }
    }
  }

  return {
    kind: 'local',
    description: `the folder ${root}`,
    uploadKey: uploadId => `uploads/${uploadId}`,
    uploadInfoKey: uploadId => `uploads/${uploadId}.json`,
    uploadsPrefix: 'uploads/',

    async stat(key) {
      const info = await stat(pathOf(key)).catch(() => null)
      return info?.isFile() ? { size: info.size, modified: info.mtime } : null
    },
    async read(key) {
      // Opened before it is handed out, so a missing file is an ENOENT here and not a stream error later.
      const stream = createReadStream(pathOf(key))
      await new Promise<void>((resolve, reject) => stream.once('open', () => resolve()).once('error', reject))
      return stream
    },
    readBuffer: key => readFile(pathOf(key)),
    localCopy: async (key) => {
      await stat(pathOf(key))
      return { path: pathOf(key), release: async () => {} }
    },
    async put(key, body) {
      const target = pathOf(key)
      await mkdir(dirname(target), { recursive: true })
      await writeFile(`${target}.partial`, body)
      await rename(`${target}.partial`, target)
    },
    async putFile(key, path) {
      const target = pathOf(key)
      await mkdir(dirname(target), { recursive: true })
      await copyFile(path, `${target}.partial`)
      await rename(`${target}.partial`, target)
    },
    async copy(from, to) {
      const target = pathOf(to)
      await mkdir(dirname(target), { recursive: true })
      try {
        // A second name for the same bytes: no copy of 40 MB.
        await link(pathOf(from), target)
      }
      catch (error) {
        const code = (error as NodeJS.ErrnoException).code
        if (code === 'EEXIST') return
        if (code !== 'EXDEV' && code !== 'EPERM' && code !== 'ENOTSUP') throw error
        await copyFile(pathOf(from), `${target}.partial`)
        await rename(`${target}.partial`, target)
      }
    },
    async workFolder(prefix) {
      // Beside the final folder, so the swap below is one rename on one file system.
      const folder = `${pathOf(prefix.replace(/\/$/, ''))}.tmp-${randomBytes(6).toString('hex')}`
      await mkdir(folder, { recursive: true })
      return folder
    },
    async replaceFolder(prefix, folder) {
      const target = pathOf(prefix.replace(/\/$/, ''))
      await rm(target, { recursive: true, force: true })
      await rename(folder, target)
    },
    remove: key => rm(pathOf(key), { force: true }),
    removePrefix: prefix => rm(pathOf(prefix.replace(/\/$/, '')), { recursive: true, force: true }),
    list: prefix => walk(pathOf(prefix.replace(/\/$/, ''))),
    async writable() {
      const probe = join(root, `.write-probe-${randomUUID()}`)
      try {
        await mkdir(root, { recursive: true })
        await writeFile(probe, 'ok')
        await unlink(probe)
        return true
      }
      catch {
        await unlink(probe).catch(() => {})
        return false
      }
    },
  }
}
