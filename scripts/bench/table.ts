// Prints the rows the benchmarks recorded (JSON Lines, see record() in support.ts) as one Markdown table.
import { readFileSync } from 'node:fs'
import { availableParallelism, cpus, loadavg, totalmem } from 'node:os'
import type { BenchRow } from './support'

const file = process.argv[2]!
const rows = readFileSync(file, 'utf8').split('\n').filter(Boolean).map(line => JSON.parse(line) as BenchRow & { benchmark: string })
const cell = (text: string) => text.replaceAll('|', '\\|')
// The load average (1, 5, 15 minutes) says how quiet the machine was: run.sh notes it when the run starts.
const loadNow = loadavg().map(l => l.toFixed(2)).join(' ')
const loadWords = `load average ${process.env.BENCH_LOAD_START ? `${process.env.BENCH_LOAD_START} at the start, ` : ''}${loadNow} at the end`
console.log(`\nMachine: ${availableParallelism()} cores (${cpus()[0]?.model.trim()}), ${(totalmem() / 2 ** 30).toFixed(1)} GiB, Node ${process.version}; ${new Date().toISOString().slice(0, 16).replace('T', ' ')} UTC; ${loadWords}\n`)
console.log('| benchmark | what | figure | compared with (same run) | goal | met |')
console.log('|---|---|---|---|---|---|')
for (const r of rows) console.log(`| ${r.benchmark} | ${cell(r.what)} | ${cell(r.figure)} | ${cell(r.comparison)} | ${cell(r.goal)} | ${r.met == null ? '–' : r.met ? 'yes' : 'no'} |`)
