// The CSV side of a pond archive, for people with a spreadsheet (README: "What the CSV files hold").
// Every file: a header row, one row per record, the fish's name and microchip beside its id, dates as
// "YYYY-MM-DD" and date-times as "YYYY-MM-DD HH:MM:SS" in UTC, and formulas escaped so a name such as
// "=HYPERLINK(…)" shows as text.
import { stringify } from 'csv-stringify'
import type { ZipFile } from 'yazl'
import type { ArchiveRecord } from '#shared/utils/archive-schema'
import { csvCell, dataValueAt, fileSlug, kindColumns, spreadsheetTime, type KindColumns } from '#shared/utils/archive-csv'
import { ENTRY_DATA_SCHEMAS } from '#shared/utils/timeline-schemas'
import { ENTRY_KINDS } from '#shared/utils/enums'

export interface ArchiveIndex {
  fish: Map<string, { name: string, microchip: string | null }>
  people: Map<string, { name: string, role: string | null }>
}

type Cells = unknown[]

/** A CSV stream fed from records; a failing source fails the stream (and so the archive), it never stalls it. */
function csvStream<T>(records: AsyncIterable<T>, columns: string[], rows: (record: T) => Cells[]) {
  const out = stringify({
    header: true, columns, bom: true,
    // A cell starting with =, +, -, @, tab or CR gets a leading apostrophe: spreadsheets show it as text, never run it.
    escape_formulas: true,
    cast: { boolean: value => (value ? 'TRUE' : 'FALSE') },
  })
  void (async () => {
    try {
      for await (const record of records) {
        for (const row of rows(record)) {
          if (!out.write(row.map(csvCell))) await new Promise(done => out.once('drain', done))
        }
      }
      out.end()
    }
    catch (error) {
      out.destroy(error as Error)
    }
  })()
  return out
}

type Entry = ArchiveRecord<'timeline'>

export interface CsvSources {
  fish: () => AsyncIterable<ArchiveRecord<'fish'>>
  timeline: (kind?: string) => AsyncIterable<Entry>
  photos: () => AsyncIterable<ArchiveRecord<'photos'>>
}

const ENTRY_COLUMNS = ['entry_id', 'fish_id', 'fish_name', 'microchip', 'occurred_at_utc', 'kind', 'author', 'author_role', 'revision', 'entered_in_error', 'error_reason', 'recorded_at_utc']

/** Every CSV of the archive, added to the ZIP in a fixed order. */
export function addCsvFiles(zip: ZipFile, index: ArchiveIndex, sources: CsvSources) {
  const fishCells = (fishId: string) => {
    const fish = index.fish.get(fishId)
    return [fishId, fish?.name ?? '', fish?.microchip ?? '']
  }
  const author = (ref: string | null) => (ref ? index.people.get(ref) : undefined)
  const entryCells = (e: Entry): Cells => [
    e.id, ...fishCells(e.fishId), spreadsheetTime(e.occurredAt), e.kind, author(e.author)?.name ?? '', author(e.author)?.role ?? '',
    e.revision, e.enteredInError, e.errorReason ?? '', spreadsheetTime(e.createdAt),
  ]
  const add = (name: string, stream: () => NodeJS.ReadableStream) => zip.addReadStreamLazy(name, cb => cb(null, stream() as never))

  add('csv/fish.csv', () => csvStream(sources.fish(), [
    'fish_id', 'name', 'microchip', 'species', 'scientific_name', 'variety', 'sex', 'hatch_year', 'hatch_year_estimated', 'status',
    'acquired_on', 'acquired_from', 'features', 'recorded_at_utc',
  ], f => [[f.id, f.name, f.microchip ?? '', f.species, f.scientificName, f.variety, f.sex, f.hatchYear, f.hatchYearEstimated, f.status,
    f.acquiredOn, f.acquiredFrom, f.features, f.createdAt]]))

  // Every entry in one file, its details in words; the files per kind below have them in columns.
  add('csv/timeline.csv', () => csvStream(sources.timeline(), [...ENTRY_COLUMNS, 'details'], e => [[...entryCells(e), csvCell(e.data)]]))

  for (const kind of ENTRY_KINDS) {
    const layout: KindColumns = kindColumns(ENTRY_DATA_SCHEMAS[kind])
    const slug = fileSlug(kind)
    add(`csv/entries-${slug}.csv`, () => csvStream(sources.timeline(kind), [...ENTRY_COLUMNS, ...layout.columns],
      e => [[...entryCells(e), ...layout.columns.map(path => dataValueAt(e.data, path))]]))
    // A list inside an entry (an exam's findings, a lab result's analytes) gets a file of its own, one row per item.
    for (const list of layout.lists) {
      add(`csv/entries-${slug}-${fileSlug(list.field)}.csv`, () => csvStream(sources.timeline(kind),
        ['entry_id', 'fish_id', 'fish_name', 'microchip', 'occurred_at_utc', 'entered_in_error', ...list.columns],
        (e) => {
          const items = dataValueAt(e.data, list.field)
          if (!Array.isArray(items)) return []
          return items.map(item => [e.id, ...fishCells(e.fishId), spreadsheetTime(e.occurredAt), e.enteredInError,
            ...list.columns.map(column => (item as Record<string, unknown>)[column])])
        }))
    }
  }

  add('csv/treatment-doses.csv', () => csvStream(sources.timeline('treatment'),
    ['entry_id', 'fish_id', 'fish_name', 'microchip', 'drug', 'dose_number', 'given_at_utc', 'given_by', 'note'],
    e => (e.doses ?? []).map(d => [e.id, ...fishCells(e.fishId), e.data.drug, d.doseNumber, spreadsheetTime(d.givenAt), author(d.givenBy)?.name ?? '', d.note])))

  add('csv/photos.csv', () => csvStream(sources.photos(),
    ['photo_id', 'file', 'fish_id', 'fish_name', 'microchip', 'view', 'caption', 'taken_at_utc', 'uploaded_at_utc', 'uploaded_by', 'sha256'],
    p => [[p.id, p.file, ...fishCells(p.fishId), p.view, p.caption, spreadsheetTime(p.takenAt), spreadsheetTime(p.createdAt), author(p.uploader)?.name ?? '', p.sha256]]))
}
