// The water test form's fields: the units a test kit may read in, and how each becomes the canonical unit the API takes.
import {
  caCO3ToGh, caCO3ToKh, celsiusToFahrenheit, fahrenheitToCelsius, no2NToNo2, no2ToNo2N, no3NToNo3, no3ToNo3N, salinityPercentToPpt, salinityPptToPercent,
} from '#shared/utils/water'
import type { MeasuredWaterParameter } from '#shared/utils/water-targets'
import type { UnitSystem } from '#shared/types'
import type { PondEventKind } from '#shared/utils/pond-events'

export interface WaterUnit {
  id: string
  label: string
  toCanonical: (value: number) => number | null
  fromCanonical: (value: number) => number | null
}

export interface WaterField {
  key: MeasuredWaterParameter
  label: string
  hint?: string
  units: WaterUnit[]
}

const same = (id: string, label: string): WaterUnit => ({ id, label, toCanonical: v => v, fromCanonical: v => v })

export const WATER_FIELDS: WaterField[] = [
  {
    key: 'temperatureC', label: 'Temperature',
    units: [same('C', '°C'), { id: 'F', label: '°F', toCanonical: fahrenheitToCelsius, fromCanonical: celsiusToFahrenheit }],
  },
  { key: 'pH', label: 'pH', units: [same('pH', 'pH')] },
  { key: 'tanMgL', label: 'Total ammonia (TAN)', hint: 'Total ammonia nitrogen, as most kits read it', units: [same('N', 'mg/L')] },
  {
    key: 'nitriteNMgL', label: 'Nitrite', hint: 'Your kit’s card says whether it reads NO2-N or NO2',
    units: [same('N', 'mg/L NO2-N'), { id: 'NO2', label: 'mg/L NO2', toCanonical: no2ToNo2N, fromCanonical: no2NToNo2 }],
  },
  {
    key: 'nitrateNMgL', label: 'Nitrate', hint: 'Your kit’s card says whether it reads NO3-N or NO3',
    units: [same('N', 'mg/L NO3-N'), { id: 'NO3', label: 'mg/L NO3', toCanonical: no3ToNo3N, fromCanonical: no3NToNo3 }],
  },
  {
    key: 'khDKH', label: 'KH (carbonate hardness)',
    units: [same('dKH', 'dKH'), { id: 'CaCO3', label: 'mg/L as CaCO3', toCanonical: caCO3ToKh, fromCanonical: v => v * 17.848 }],
  },
  {
    key: 'ghDGH', label: 'GH (general hardness)',
    units: [same('dGH', 'dGH'), { id: 'CaCO3', label: 'mg/L as CaCO3', toCanonical: caCO3ToGh, fromCanonical: v => v * 17.848 }],
  },
  { key: 'dissolvedOxygenMgL', label: 'Dissolved oxygen', units: [same('mgL', 'mg/L')] },
  {
    key: 'salinityPpt', label: 'Salinity',
    units: [same('ppt', 'ppt'), { id: 'percent', label: '%', toCanonical: salinityPercentToPpt, fromCanonical: salinityPptToPercent }],
  },
]

/** The unit each field starts in: °F for a person who chose US units, the canonical unit otherwise. */
export function defaultWaterUnits(system: UnitSystem): Record<MeasuredWaterParameter, string> {
  const units = Object.fromEntries(WATER_FIELDS.map(f => [f.key, f.units[0]!.id])) as Record<MeasuredWaterParameter, string>
  if (system === 'us') units.temperatureC = 'F'
  return units
}

/** Six decimals are finer than any test kit; they stop conversion noise (0.30480000000000002) reaching the record. */
export function tidyReading(value: number) {
  return Number(value.toFixed(6))
}

/** Fish events on the water charts and their list: one colour per kind from our palette. */
export const WATER_EVENT_COLOURS: Record<PondEventKind, string> = { treatment: '#257a73', procedure: '#c4450b', observation: '#6b5b1e', death: '#072224' }
