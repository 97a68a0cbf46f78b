import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { ACCEPTED_TYPES, DERIVED_SIZES, MAX_UPLOAD_BYTES } from '../../shared/utils/photo-limits'
import { photoUpdateSchema, uploadMetadataSchema } from '../../shared/utils/photo-schemas'

const ROOT = resolve(import.meta.dirname, '../..')
const packageJson = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'))

function versionParts(version: string) {
  return version.split('.').map(Number)
}

function atLeast(version: string, minimum: string) {
  const [a, b] = [versionParts(version), versionParts(minimum)]
  for (let i = 0; i < 3; i++) if (a[i] !== b[i]) return a[i]! > b[i]!
  return true
}

function filesUnder(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name)
    return statSync(path).isDirectory() ? filesUnder(path) : path.endsWith('.js') ? [path] : []
  })
}

describe('the tus server package', () => {
  it('is pinned exactly, at 2.4.3 or later, and installed at that version', () => {
    // Before 2.4.3 an upload id could name a path outside the storage folder (the version floor is the project
    // brief's; the API test "rejects ids that try to leave the upload folder" checks the behaviour itself).
    const pinned = packageJson.dependencies['@tus/server'] as string
    expect(pinned).toMatch(/^\d+\.\d+\.\d+$/)
    expect(atLeast(pinned, '2.4.3')).toBe(true)
    const installed = JSON.parse(readFileSync(join(ROOT, 'node_modules/@tus/server/package.json'), 'utf8')).version
    expect(installed).toBe(pinned)
  })

  it('has the guards that keep upload ids inside the storage folder', () => {
    const handler = readFileSync(join(ROOT, 'node_modules/@tus/server/dist/handlers/BaseHandler.js'), 'utf8')
    expect(handler).toContain('id.includes(\'/\')')
    expect(handler).toContain('id.includes(\'\\\\\')')
    const store = readFileSync(join(ROOT, 'node_modules/@tus/file-store/dist/index.js'), 'utf8')
    expect(store).toContain('isPathInsideDirectory(this.directory, filePath)')
  })

  it('does not use AbortSignal.any, which leaks memory on Node 20 (tus-node-server #717, fixed by #718)', () => {
    const dirs = ['node_modules/@tus/server/dist', 'node_modules/@tus/utils/dist', 'node_modules/@tus/file-store/dist']
    const sources = dirs.flatMap(dir => filesUnder(join(ROOT, dir)))
    expect(sources.length).toBeGreaterThan(10)
    const users = sources.filter(file => readFileSync(file, 'utf8').includes('AbortSignal.any'))
    expect(users).toEqual([])
  })
})

describe('photo limits and schemas shared by the uploader and the server', () => {
  it('keeps 40 MB, three sizes and three types', () => {
    expect(MAX_UPLOAD_BYTES).toBe(41_943_040)
    expect([...DERIVED_SIZES]).toEqual([320, 1024, 2048])
    expect([...ACCEPTED_TYPES]).toEqual(['image/jpeg', 'image/png', 'image/webp'])
  })

  it('reads upload metadata with defaults and refuses what is not a fish id or a view', () => {
    const fishId = '0b6f0a8e-6f1e-4c55-9a6b-3d1c2b7c9e10'
    expect(uploadMetadataSchema.parse({ fishId })).toEqual({ fishId, filename: '', view: 'other', caption: '' })
    expect(uploadMetadataSchema.safeParse({ fishId: 'x' }).success).toBe(false)
    expect(uploadMetadataSchema.safeParse({ fishId, view: 'underneath' }).success).toBe(false)
  })

  it('needs a view or a caption to change', () => {
    expect(photoUpdateSchema.safeParse({}).success).toBe(false)
    expect(photoUpdateSchema.safeParse({ caption: '  Spring check  ' }).data).toEqual({ caption: 'Spring check' })
    expect(photoUpdateSchema.safeParse({ caption: 'x', extra: 1 }).success).toBe(false)
  })
})
