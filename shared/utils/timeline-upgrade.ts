// Entries written before procedures had codes, treatments a "per fish" unit and companions our
// general relation list are brought to the current form once, as a new revision with a reason
// (scripts/migrate.ts for the database, the archive import for archives made earlier).
// The legacy procedure wording is read here, once, to set the code; standing facts then read the code only.
import type { EntryKind, ProcedureCode } from './timeline-schemas'

type Data = Record<string, unknown>

const LEGACY_ENUCLEATION = /enucleat|eye removal|eye removed/i
const LEGACY_PROCEDURE_NAMES: Record<string, ProcedureCode> = {
  'mass removal': 'mass_removal', 'biopsy': 'biopsy', 'fin trim': 'fin_trim', 'wound debridement': 'wound_care',
  'microchip implant': 'microchip_implant', 'wen trim': 'wen_trim',
}
const LEGACY_RELATIONS: Record<string, string> = { guides: 'leads', always_together: 'stays_close', aggressive_toward: 'chases' }

export const UPGRADE_REASON = 'Brought to the current record form (procedure code, dose unit or relation name); nothing clinical changed'

/** The entry's data in the current form, or null when it already is. */
export function upgradeEntryData(kind: EntryKind | string, data: Data): Data | null {
  if (kind === 'procedure' && typeof data.code !== 'string') {
    const name = String(data.name ?? '')
    const code: ProcedureCode = LEGACY_ENUCLEATION.test(name) ? 'enucleation' : LEGACY_PROCEDURE_NAMES[name.trim().toLowerCase()] ?? 'other'
    const { surgeon, ...rest } = data
    return { ...rest, code, name, performedBy: String(rest.performedBy ?? surgeon ?? '') }
  }
  if (kind === 'treatment' && data.doseUnit === 'dose') return { ...data, doseUnit: 'per fish' }
  if (kind === 'companion' && typeof data.relation === 'string' && LEGACY_RELATIONS[data.relation]) return { ...data, relation: LEGACY_RELATIONS[data.relation] }
  return null
}

/** The SQL condition (on alias e) that finds entries `upgradeEntryData` would change. */
export const UPGRADE_CANDIDATES = `(e.kind = 'procedure' and not (e.data ? 'code'))
  or (e.kind = 'treatment' and e.data->>'doseUnit' = 'dose')
  or (e.kind = 'companion' and e.data->>'relation' in ('guides', 'always_together', 'aggressive_toward'))`
