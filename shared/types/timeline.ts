// Small parts of the timeline's answers that several handlers build. The answers themselves have no copy
// here: the app reads each from its route (`ApiResponse<'/api/fish/:fishId/timeline'>`, app/utils/api-shapes.ts).
import type { ArchivePersonRow, FishRow, UserRow } from './rows'

export type PersonRef = Pick<UserRow, 'id' | 'name'>
export type FishRef = Pick<FishRow, 'id' | 'name'>

/**
 * An entry (or photo) read in from a pond archive: its author as the archive names them, never a local
 * account, with the archive's date and who imported it.
 */
export interface ImportedAuthorship extends Pick<ArchivePersonRow, 'name'> {
  /** Their role in the pond when the archive was made, if the archive says. */
  role: ArchivePersonRow['role']
  archiveMadeAt: string
  importedBy: string
  importedAt: string
}
