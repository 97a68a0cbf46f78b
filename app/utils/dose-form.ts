// Shared pieces of the dose helper forms: reading typed numbers and turning a worked-out dose into a treatment entry.
import { parseDecimal, type DecimalMark } from '#shared/utils/decimal'
import type { PondRole } from '#shared/types'

/** The typed number, or null when the field is empty or cannot be read (the field shows why). */
export function doseNumber(text: string, decimalMark: DecimalMark): number | null {
  return text.trim() ? parseDecimal(text, decimalMark) : null
}

/** "1,234.5" in the reader's style; enough decimals for a measuring tool, no float noise. */
export function formatAmount(value: number, decimals: number) {
  return new Intl.NumberFormat('en-US', { minimumFractionDigits: 0, maximumFractionDigits: decimals }).format(value)
}

export function todayIso() {
  const now = new Date()
  return new Date(now.getTime() - now.getTimezoneOffset() * 60_000).toISOString().slice(0, 10)
}

export interface DoseTreatment {
  drug: string
  route: 'tank_bath' | 'pond_immersion' | 'dip' | 'injection'
  dose: number
  doseUnit: 'mg/L' | '%' | 'mg/kg'
  injectionSite?: string
  /** Minutes in the solution: required for a dip or a hospital-tank bath. */
  exposureMinutes?: number
  volumeTreatedL?: number
  amountAdded?: number
  amountAddedUnit?: 'g' | 'kg'
  notes: string
  /** A vet of the pond (their user id), when someone else records what they gave. */
  instructedById?: string
}

/** A bath in the whole pond is prolonged immersion; in a separate tank it is a timed hospital-tank bath. */
export function bathRoute(where: 'pond' | 'tank'): DoseTreatment['route'] {
  return where === 'pond' ? 'pond_immersion' : 'tank_bath'
}

/**
 * The body of the normal timeline POST for a dose worked out here. A keeper records a dose a vet asked for,
 * so the instructing vet is named; the working goes into the notes so the record shows how it was reached.
 */
export function treatmentEntry(dose: DoseTreatment, role: PondRole, givenBy: string) {
  const data: Record<string, unknown> = {
    drug: dose.drug, route: dose.route, dose: dose.dose, doseUnit: dose.doseUnit, startOn: todayIso(), givenBy, notes: dose.notes,
  }
  for (const key of ['injectionSite', 'exposureMinutes', 'volumeTreatedL', 'amountAdded', 'amountAddedUnit'] as const) {
    if (dose[key] !== undefined && dose[key] !== '') data[key] = dose[key]
  }
  if (role !== 'vet') data.instructedById = dose.instructedById ?? ''
  return { id: crypto.randomUUID(), kind: 'treatment' as const, occurredAt: new Date().toISOString(), data }
}
