// Words the timeline shows for the stored values.
import type { TimelineKind } from '#shared/utils/timeline-schemas'
import type { ImportedAuthorship } from '#shared/types/timeline'
import { formatDate, formatDay as formatCalendarDay, formatTime, type DateStyle } from '#shared/utils/dates'

export const KIND_LABELS: Record<TimelineKind, string> = {
  measurement: 'Weight & length',
  observation: 'Observation',
  exam: 'Exam',
  problem: 'Problem',
  procedure: 'Procedure',
  anaesthesia: 'Anaesthesia',
  treatment: 'Treatment',
  lab_result: 'Lab result',
  companion: 'Companion',
  death: 'Death',
  photo: 'Photo',
  move: 'Move',
  owner_change: 'New owner',
  pond_event: 'Whole pond',
}

// Colour per kind from our palette: clinical kinds warm, daily care cool, states by meaning.
export const KIND_TONES: Record<TimelineKind, string> = {
  measurement: 'bg-pond-100 text-pond-800',
  observation: 'bg-reed-100 text-reed-700',
  exam: 'bg-koi-100 text-koi-800',
  problem: 'bg-clay-100 text-clay-700',
  procedure: 'bg-koi-200 text-koi-900',
  anaesthesia: 'bg-koi-50 text-koi-800',
  treatment: 'bg-sand-200 text-pond-900',
  lab_result: 'bg-pond-50 text-pond-700',
  companion: 'bg-reed-100 text-reed-700',
  death: 'bg-pond-900 text-white',
  photo: 'bg-sand-100 text-pond-700',
  move: 'bg-sand-100 text-pond-700',
  owner_change: 'bg-sand-100 text-pond-700',
  pond_event: 'bg-pond-200 text-pond-900',
}

export const SIGN_LABELS: Record<string, string> = {
  eating_well: 'Eating well', poor_appetite: 'Poor appetite', not_eating: 'Not eating', lethargic: 'Lethargic',
  flashing: 'Flashing', rubbing: 'Rubbing', clamped_fins: 'Clamped fins', gasping: 'Gasping at the surface', hiding: 'Hiding',
  sitting_on_bottom: 'Sitting on the bottom', floating: 'Floating', erratic_swimming: 'Erratic swimming',
  white_spots: 'White spots', red_streaks: 'Red streaks', ulcer: 'Ulcer', fin_damage: 'Fin damage', cloudy_eye: 'Cloudy eye',
  raised_scales: 'Raised scales', pale_gills: 'Pale gills', excess_mucus: 'Excess mucus', swollen_belly: 'Swollen belly', lump: 'Lump', thin: 'Thin',
}

export const BODY_SYSTEM_LABELS: Record<string, string> = {
  general: 'General condition', skin: 'Skin & scales', fins: 'Fins', gills: 'Gills', eyes: 'Eyes', mouth: 'Mouth',
  buoyancy: 'Buoyancy & swimming', coelom: 'Body cavity', vent: 'Vent', musculoskeletal: 'Muscles & skeleton',
}

export const FINDING_LABELS: Record<string, string> = { normal: 'Normal', abnormal: 'Abnormal', not_examined: 'Not examined' }
export const SIDE_LABELS: Record<string, string> = { left: 'Left', right: 'Right', both: 'Both', not_applicable: 'Not applicable' }
// 'bath' was stored before baths were split into hospital tank and whole pond.
export const ROUTE_LABELS: Record<string, string> = {
  dip: 'Dip', tank_bath: 'Hospital-tank bath', pond_immersion: 'Whole pond (prolonged immersion)', injection: 'Injection', in_feed: 'In feed', topical: 'Topical',
  bath: 'Bath',
}
// 'dose' was stored before it read "per fish".
export const DOSE_UNIT_LABELS: Record<string, string> = { 'mg/L': 'mg/L (ppm)', 'dose': 'per fish' }
export const doseUnitLabel = (unit: string) => DOSE_UNIT_LABELS[unit] ?? unit
export const PROCEDURE_LABELS: Record<string, string> = {
  enucleation: 'Enucleation (eye removal)', mass_removal: 'Mass removal', biopsy: 'Biopsy', fin_trim: 'Fin trim', wound_care: 'Wound care',
  microchip_implant: 'Microchip implant', wen_trim: 'Wen trim', gill_clip: 'Gill clip', skin_scrape: 'Skin scrape', other: 'Other',
}
export const PANEL_LABELS: Record<string, string> = {
  haematology: 'Haematology', biochemistry: 'Biochemistry', skin_scrape: 'Skin scrape', gill_biopsy: 'Gill biopsy', culture: 'Culture', other: 'Other test',
}
export const RELATION_LABELS: Record<string, string> = {
  leads: 'Leads (is followed)', stays_close: 'Keeps close', chases: 'Chases', avoids: 'Avoids', spawns_with: 'Spawns with', parent_of: 'Parent of', other: 'Other',
}
export const PROBLEM_STATUS_LABELS: Record<string, string> = { suspected: 'Suspected', active: 'Active', resolved: 'Resolved' }
export const LENGTH_TYPE_LABELS: Record<string, string> = { total: 'total length', fork: 'fork length', standard: 'standard length' }
const LENGTH_TYPE_ABBREVIATIONS: Record<string, string> = { total: 'TL', fork: 'FL', standard: 'SL' }

/** "K (TL)": Fulton's K reads higher from fork or standard length, so the label says which was used. */
export function conditionFactorLabel(lengthType: string | undefined) {
  return `K (${LENGTH_TYPE_ABBREVIATIONS[lengthType ?? 'total'] ?? lengthType})`
}

/** Relative weight is only computed against the common carp standard (Bister et al. 2000, docs/references.md). */
export const RELATIVE_WEIGHT_NOTE = 'against wild common carp, 100 = standard'

// These read the reader's date style (useDateStyle) so every list and card prints dates alike; call
// them while rendering or in setup. Outside a Nuxt context they fall back to the default style.
function readerStyle(): DateStyle {
  return tryUseNuxtApp() ? useDateStyleState().value : {}
}

/** "18 Apr 2023" (or "Apr 18, 2023") in the reader's locale and time zone. */
export function formatEntryDate(iso: string) {
  return formatDate(iso, readerStyle())
}

/** "14:05" in the reader's time zone; 24-hour unless their locale writes it otherwise. */
export function formatEntryTime(iso: string) {
  return formatTime(iso, readerStyle())
}

/** A stored calendar day (YYYY-MM-DD) shown the same way, without any time-zone shift. */
export function formatDay(day: string) {
  return formatCalendarDay(day, readerStyle())
}

/**
 * Who wrote an entry read in from a pond archive, in our words: the archive's person (never a local
 * account), the archive's date and who imported it.
 */
export function importedAuthorText(imported: ImportedAuthorship) {
  const who = imported.role ? `${imported.name} (${imported.role})` : imported.name
  return `Imported — recorded by ${who}, from a pond archive made on ${formatEntryDate(imported.archiveMadeAt)}, imported by ${imported.importedBy || 'a former member'}`
}
