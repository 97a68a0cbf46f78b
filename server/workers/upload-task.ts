// What the server sends the upload worker and what comes back (structured-cloned between threads).
import type { ArchiveManifest } from '../../shared/utils/archive-schema'
import type { Spreadsheet } from './spreadsheet-read'
import type { UploadProblem } from './zip-reader'

export type UploadTask
  = | { kind: 'spreadsheet', name: string, path: string, sheet?: string, sampleRows?: number }
    | { kind: 'archive', path: string }

export type UploadTaskResult
  = | { ok: true, kind: 'spreadsheet', sheet: Spreadsheet }
    | { ok: true, kind: 'archive', manifest: ArchiveManifest }
    | { ok: false, status: number, message: string, field: string, problems: UploadProblem[] }
