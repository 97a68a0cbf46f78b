// Export and import of a whole pond at two sizes: time and the server's peak memory, to show memory stays flat.
import { createHash } from 'node:crypto'
import { createWriteStream } from 'node:fs'
import { mkdir, readFile, stat, writeFile } from 'node:fs/promises'
import { join } from 'node:path'
import { Readable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import pg from 'pg'
import sharp from 'sharp'
import { BENCH_PASSWORD, peakMemoryMiB, signInCookie, startBenchServer } from './support'

const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 4 })
const storage = process.env.BENCH_STORAGE_DIR!
// The third run repeats the large pond with the server's heap capped: it only completes if memory stays bounded.
const HEAP_CAP_MIB = 160
const SIZES = [{ fish: 150, photosPerFish: 10, cap: false }, { fish: 300, photosPerFish: 10, cap: false }, { fish: 300, photosPerFish: 10, cap: true }]
const MONTHS = 240

async function seedPond(label: string, fishCount: number, photosPerFish: number, ownerId: string, base: Buffer) {
  const { rows: [pond] } = await pool.query(`insert into ponds (name, volume_litres) values ($1, 40000) returning id`, [label])
  await pool.query(`insert into memberships (pond_id, user_id, role) values ($1, $2, 'owner')`, [pond.id, ownerId])
  await pool.query(`
    insert into fish (pond_id, name, species, scientific_name, variety, hatch_year)
    select $1, 'Fish ' || lpad(i::text, 3, '0'), 'koi', 'Cyprinus carpio', 'Kohaku', 2000 + i % 6 from generate_series(1, $2) i`, [pond.id, fishCount])
  // Twenty years of monthly measurements per fish, each with its first revision.
  await pool.query(`
    with e as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
      select f.id, f.pond_id, 'measurement', now() - (m || ' months')::interval, $2,
        jsonb_build_object('weightG', 200 + 15 * ($3 - m), 'lengthCm', 20 + ($3 - m) * 0.15, 'lengthType', 'total')
      from fish f cross join generate_series(1, $3) m where f.pond_id = $1
      returning id, occurred_at, data, author_id
    )
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id) select id, 1, occurred_at, data, author_id from e`, [pond.id, ownerId, MONTHS])
  const { rows: fish } = await pool.query('select id from fish where pond_id = $1', [pond.id])
  const originals = join(storage, 'photos', 'originals')
  await mkdir(originals, { recursive: true })
  let n = 0
  for (const f of fish) {
    const values: unknown[] = []
    const tuples: string[] = []
    for (let i = 0; i < photosPerFish; i++) {
      // Distinct bytes per photo: a JPEG ignores what follows its end marker.
      const bytes = Buffer.concat([base, Buffer.from(`${label}-${n++}`)])
      const { rows: [{ id }] } = await pool.query('select gen_random_uuid() as id')
      await writeFile(join(originals, id), bytes)
      values.push(id, f.id, ownerId, createHash('sha256').update(bytes).digest('hex').slice(0, 32), bytes.length, createHash('sha256').update(bytes).digest('hex'))
      const o = values.length - 6
      tuples.push(`($${o + 1}, $${o + 2}, $${o + 3}, $${o + 4}, 'ready', 'image/jpeg', $${o + 5}, $${o + 6})`)
    }
    await pool.query(`insert into photos (id, fish_id, uploader_id, upload_id, state, mime, bytes, sha256) values ${tuples.join(', ')}`, values)
  }
  return pond.id as string
}

async function main() {
  const hash = await new Hash(new Scrypt({})).make(BENCH_PASSWORD)
  const { rows: [owner] } = await pool.query(`insert into users (name, email, password_hash) values ('Bench Owner', 'bench@example.com', $1) returning id`, [hash])
  const base = await sharp({ create: { width: 640, height: 480, channels: 3, background: '#3f978f' } }).jpeg({ quality: 80 }).toBuffer()
  const results = []
  for (const size of SIZES) {
    const started = performance.now()
    const pondId = await seedPond(`Bench ${size.fish}${size.cap ? ' capped' : ''}`, size.fish, size.photosPerFish, owner.id, base)
    console.log(`seeded ${size.fish} fish, ${size.fish * MONTHS} measurements, ${size.fish * size.photosPerFish} photos in ${((performance.now() - started) / 1000).toFixed(1)} s`)
    await pool.query('analyze')
    const env: Record<string, string> = size.cap ? { NODE_OPTIONS: `--max-old-space-size=${HEAP_CAP_MIB}` } : {}

    const exporter = await startBenchServer(3510, env)
    const idle = peakMemoryMiB(exporter.pid)
    const cookie = await signInCookie(exporter.url, 'bench@example.com')
    const archive = join(storage, `bench-${size.fish}.zip`)
    const t0 = performance.now()
    const response = await fetch(`${exporter.url}/api/ponds/${pondId}/export`, { headers: { cookie } })
    await pipeline(Readable.fromWeb(response.body as never), createWriteStream(archive))
    const exportSeconds = (performance.now() - t0) / 1000
    const exportPeak = peakMemoryMiB(exporter.pid)
    exporter.stop()

    const importer = await startBenchServer(3511, env)
    const importCookie = await signInCookie(importer.url, 'bench@example.com')
    const body = await readFile(archive)
    const t1 = performance.now()
    const imported = await fetch(`${importer.url}/api/ponds/import`, { method: 'POST', headers: { 'cookie': importCookie, 'content-type': 'application/zip' }, body })
    const importSeconds = (performance.now() - t1) / 1000
    const importPeak = peakMemoryMiB(importer.pid)
    if (imported.status !== 201) throw new Error(`import answered ${imported.status}: ${await imported.text()}`)
    importer.stop()
    const archiveMiB = (await stat(archive)).size / 1024 ** 2
    results.push({ ...size, archiveMiB, exportSeconds, exportPeak, importSeconds, importPeak, idle })
    console.log(`${size.fish} fish${size.cap ? ` (heap capped at ${HEAP_CAP_MIB} MiB)` : ''}: archive ${archiveMiB.toFixed(0)} MiB; export ${exportSeconds.toFixed(1)} s, server peak ${exportPeak.toFixed(0)} MiB (idle ${idle.toFixed(0)} MiB); import ${importSeconds.toFixed(1)} s, server peak ${importPeak.toFixed(0)} MiB`)
    body.fill(0)
  }
  const [small, large] = results as [typeof results[0], typeof results[0]]
  console.log(`size ratio ${(large.fish / small.fish).toFixed(1)}x → export time ${(large.exportSeconds / small.exportSeconds).toFixed(2)}x, export peak memory ${(large.exportPeak / small.exportPeak).toFixed(2)}x; import time ${(large.importSeconds / small.importSeconds).toFixed(2)}x, import peak memory ${(large.importPeak / small.importPeak).toFixed(2)}x`)
  await pool.end()
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
