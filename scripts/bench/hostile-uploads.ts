// Hostile uploads: ten files posted at once to the built server — workbooks with a hidden local entry that
// inflates to gigabytes, legal 10 MB workbooks, 200,000-row CSVs and pond archives holding a 500 MB
// manifest — while a separate process polls /api/health. Reports the health route's p50/p99 (goal: p99
// under 100 ms), the server's peak resident memory (VmHWM, worker threads included; goal: under 600 MB)
// and what each upload was answered.
// Run: bash scripts/bench/run.sh hostile-uploads
import { spawn } from 'node:child_process'
import { cpus, loadavg } from 'node:os'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import pg from 'pg'
import { archiveWithPaddedManifest, largeCsv, largeWorkbook, smallWorkbook, withHiddenEntry } from '../../tests/support/hostile-files'
import { BENCH_PASSWORD, peakMemoryMiB, signInCookie, startBenchServer } from './support'

const PORT = Number(process.env.BENCH_PORT ?? 3530)
const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 })
const percentile = (values: number[], p: number) => [...values].sort((a, b) => a - b)[Math.min(values.length - 1, Math.ceil(values.length * p) - 1)]!

/**
 * Polls the health route from a separate process, so this process's own work does not skew the timing. A probe
 * that fails (connection reset, no answer within 10 s, a 5xx) is counted and timed like the others, never dropped.
 */
function startHealthProbe(url: string) {
  const child = spawn(process.execPath, ['-e', `
    const times = []; const failures = []; let stop = false
    process.stdin.on('data', () => { stop = true })
    ;(async () => {
      while (!stop) {
        const t = performance.now()
        try {
          const r = await fetch(${JSON.stringify(`${url}/api/health`)}, { signal: AbortSignal.timeout(10000) })
          await r.text()
          if (r.status >= 500) failures.push('status ' + r.status)
        }
        catch (error) {
          failures.push(String(error.cause?.code ?? error.name ?? error))
        }
        times.push(performance.now() - t)
        await new Promise(r => setTimeout(r, 5))
      }
      process.stdout.write(JSON.stringify({ times, failures }))
    })()
  `], { stdio: ['pipe', 'pipe', 'inherit'] })
  let output = ''
  child.stdout.on('data', (d: Buffer) => (output += d.toString()))
  const exited = new Promise<void>(resolve => child.once('exit', () => resolve()))
  return {
    stop: async () => {
      child.stdin.end('stop')
      await exited
      return JSON.parse(output) as { times: number[], failures: string[] }
    },
  }
}

async function seed() {
  const hash = await new Hash(new Scrypt({})).make(BENCH_PASSWORD)
  const { rows: [user] } = await pool.query('insert into users (name, email, password_hash) values (\'Hostile Bench\', \'hostile-bench@example.com\', $1) returning id', [hash])
  const { rows: [pond] } = await pool.query('insert into ponds (name) values (\'Hostile bench pond\') returning id')
  await pool.query('insert into memberships (pond_id, user_id, role) values ($1, $2, \'owner\')', [pond.id, user.id])
  await pool.query('insert into fish (pond_id, name, species, scientific_name) values ($1, \'Fish 1\', \'koi\', \'Cyprinus carpio\')', [pond.id])
  return pond.id as string
}

interface Upload { label: string, send: () => Promise<Response> }

async function main() {
  const pondId = await seed()
  const app = await startBenchServer(PORT)
  const cookie = await signInCookie(app.url, 'hostile-bench@example.com')
  const sheet = (name: string, data: Buffer | string) => () => {
    const form = new FormData()
    form.set('file', new Blob([typeof data === 'string' ? data : new Uint8Array(data)]), name)
    return fetch(`${app.url}/api/ponds/${pondId}/measurement-imports/columns`, { method: 'POST', headers: { cookie }, body: form })
  }
  const archive = (data: Buffer) => () => fetch(`${app.url}/api/ponds/import`, { method: 'POST', headers: { cookie, 'content-type': 'application/zip' }, body: new Uint8Array(data) })

  console.log('Building the hostile files ...')
  const hidden = await withHiddenEntry(await smallWorkbook(), 'xl/worksheets/sheet9.xml', 2 * 1024 ** 3)
  const workbook = await largeWorkbook(100_000)
  const csv = largeCsv(200_000)
  const manifest = await archiveWithPaddedManifest({ format: 'fintrail-pond-archive' }, 500 * 1024 ** 2)
  console.log(`  workbook with a hidden 2 GiB entry: ${(hidden.length / 1024 ** 2).toFixed(1)} MB; legal workbook of 100,000 rows: ${(workbook.length / 1024 ** 2).toFixed(1)} MB;`)
  console.log(`  CSV of 200,000 rows: ${(Buffer.byteLength(csv) / 1024 ** 2).toFixed(1)} MB; archive with a 500 MB manifest: ${(manifest.length / 1024 ** 2).toFixed(1)} MB`)
  const uploads: Upload[] = [
    ...Array.from({ length: 3 }, (_, i) => ({ label: `hidden entry ${i + 1}`, send: sheet('hidden.xlsx', hidden) })),
    ...Array.from({ length: 3 }, (_, i) => ({ label: `10 MB workbook ${i + 1}`, send: sheet('large.xlsx', workbook) })),
    ...Array.from({ length: 2 }, (_, i) => ({ label: `200,000-row CSV ${i + 1}`, send: sheet('large.csv', csv) })),
    ...Array.from({ length: 2 }, (_, i) => ({ label: `500 MB manifest ${i + 1}`, send: archive(manifest) })),
  ]

  console.log(`load average before: ${loadavg().map(n => n.toFixed(1)).join(', ')} (${cpus().length} cores)`)
  const idleProbe = startHealthProbe(app.url)
  await new Promise(r => setTimeout(r, 2000))
  const { times: idle } = await idleProbe.stop()
  const before = peakMemoryMiB(app.pid)
  const probe = startHealthProbe(app.url)
  const started = performance.now()
  const answers = await Promise.all(uploads.map(async ({ label, send }) => {
    const t = performance.now()
    try {
      const response = await send()
      const text = await response.text()
      let said = text.slice(0, 200)
      try {
        const body = JSON.parse(text) as { message?: string, rowCount?: number }
        said = body.message ?? `${body.rowCount} rows read`
      }
      catch { /* not JSON: shown as text */ }
      return { label, status: response.status, ms: performance.now() - t, said }
    }
    catch (error) {
      return { label, status: 0, ms: performance.now() - t, said: `no answer: ${String((error as { cause?: { code?: string } }).cause?.code ?? error)}` }
    }
  }))
  const elapsed = performance.now() - started
  const { times: busy, failures } = await probe.stop()
  const peak = peakMemoryMiB(app.pid)
  app.stop()

  console.log(`\nTen hostile uploads at once (${(elapsed / 1000).toFixed(1)} s for all):`)
  for (const a of answers) console.log(`  ${a.label}: ${a.status} after ${(a.ms / 1000).toFixed(1)} s — ${a.said.slice(0, 140)}`)
  console.log(`\n/api/health idle: p50 ${percentile(idle, 0.5).toFixed(1)} ms, p99 ${percentile(idle, 0.99).toFixed(1)} ms (${idle.length} probes)`)
  console.log(`/api/health busy: p50 ${percentile(busy, 0.5).toFixed(1)} ms, p99 ${percentile(busy, 0.99).toFixed(1)} ms, max ${Math.max(...busy).toFixed(1)} ms (${busy.length} probes, ${failures.length} failed${failures.length ? `: ${[...new Set(failures)].join(', ')}` : ''}; goal p99 under 100 ms)`)
  console.log(`server peak RSS (VmHWM): ${before.toFixed(0)} MiB before, ${peak.toFixed(0)} MiB after (goal under 600 MB)`)
  console.log(`load average at the end: ${loadavg().map(n => n.toFixed(1)).join(', ')} (${cpus().length} cores)`)
  if (answers.some(a => a.status === 0 || (a.status >= 500 && a.status !== 503))) throw new Error('an upload was answered with a 5xx or not at all')
  await pool.end()
}

main().catch((error) => {
  console.error(error)
  process.exit(1)
})
