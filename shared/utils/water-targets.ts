// Target ranges for a pond's water tests, the flag of each reading, and where each default comes from.
// A pond may override any range (owner or vet); the defaults below name their source on the screen.
import type { PondRole } from '../types'
import { ammoniaChronicCriterionTanMgL, unionizedAmmonia } from './water'

/** Who may change a pond's ranges: the owner and the vet decide what the fish need; keepers read them. */
export const WATER_TARGET_EDITORS: readonly PondRole[] = ['owner', 'vet']

/** Every value a water test holds, in the canonical unit the API uses, plus the computed NH3-N. */
export const WATER_PARAMETERS = [
  'temperatureC', 'pH', 'tanMgL', 'unionizedAmmoniaNMgL', 'nitriteNMgL', 'nitrateNMgL',
  'khDKH', 'ghDGH', 'dissolvedOxygenMgL', 'salinityPpt',
] as const
export type WaterParameter = typeof WATER_PARAMETERS[number]

/** The values a person measures (everything but the computed NH3-N). */
export const MEASURED_WATER_PARAMETERS = WATER_PARAMETERS.filter(p => p !== 'unionizedAmmoniaNMgL') as Exclude<WaterParameter, 'unionizedAmmoniaNMgL'>[]
export type MeasuredWaterParameter = typeof MEASURED_WATER_PARAMETERS[number]

export type WaterFlag = 'low' | 'ok' | 'high'

export interface WaterTarget {
  low: number | null
  high: number | null
}

/** A pond's own ranges; a parameter missing here uses the default. */
export type PondWaterTargets = Partial<Record<WaterParameter, WaterTarget>>

export interface WaterParameterInfo {
  label: string
  unit: string
  /** Decimals worth showing for a reading in the canonical unit. */
  decimals: number
  defaultTarget: WaterTarget
  source: string
}

const SRAC_464 = 'Southern Regional Aquaculture Center publication 464 (Wurts & Durborow 1992)'

export const WATER_PARAMETER_INFO: Record<WaterParameter, WaterParameterInfo> = {
  temperatureC: {
    label: 'Temperature', unit: '°C', decimals: 1, defaultTarget: { low: 4, high: 28 },
    source: 'Common practice for koi and goldfish ponds (no published table): below 4 °C fish rest, above 28 °C oxygen runs short.',
  },
  pH: {
    label: 'pH', unit: '', decimals: 1, defaultTarget: { low: 6.5, high: 9 },
    source: `${SRAC_464}: pH 6.5–9.0 acceptable for pond fish (7.0–8.0 desirable).`,
  },
  tanMgL: {
    label: 'Total ammonia (TAN)', unit: 'mg/L N', decimals: 2, defaultTarget: { low: null, high: null },
    source: 'US EPA 2013 freshwater ammonia criteria (EPA-822-R-13-001): the chronic criterion at this test’s pH and temperature (1.9 mg/L at pH 7 and 20 °C). Needs pH and temperature in the same test.',
  },
  unionizedAmmoniaNMgL: {
    label: 'Un-ionized ammonia (NH3-N)', unit: 'mg/L N', decimals: 3, defaultTarget: { low: null, high: 0.02 },
    source: 'Computed from TAN, pH and temperature (Emerson et al. 1975). Limit 0.02 mg/L: common practice for warm-water fish (recalled, not read from a table).',
  },
  nitriteNMgL: {
    label: 'Nitrite', unit: 'mg/L NO2-N', decimals: 2, defaultTarget: { low: null, high: 0.1 },
    source: 'Common practice: an established pond reads no nitrite; above 0.1 mg/L NO2-N (0.33 mg/L NO2) look for the cause.',
  },
  nitrateNMgL: {
    label: 'Nitrate', unit: 'mg/L NO3-N', decimals: 1, defaultTarget: { low: null, high: 10 },
    source: 'Common practice: keep nitrate below about 10 mg/L NO3-N (44 mg/L NO3) with water changes.',
  },
  khDKH: {
    label: 'KH (alkalinity)', unit: 'dKH', decimals: 1, defaultTarget: { low: 4.2, high: 11.2 },
    source: `${SRAC_464}: alkalinity 75–200 mg/L as CaCO3 desirable (4.2–11.2 dKH at 17.848 mg/L per dKH), at least 20 mg/L.`,
  },
  ghDGH: {
    label: 'GH (hardness)', unit: 'dGH', decimals: 1, defaultTarget: { low: 4, high: 16 },
    source: 'Common practice for koi and goldfish: 4–16 dGH (about 70–290 mg/L as CaCO3).',
  },
  dissolvedOxygenMgL: {
    label: 'Dissolved oxygen', unit: 'mg/L', decimals: 1, defaultTarget: { low: 5, high: null },
    source: 'Common practice for warm-water pond fish: at least 5 mg/L; below 3 mg/L fish gasp at the surface.',
  },
  salinityPpt: {
    label: 'Salinity', unit: 'ppt', decimals: 1, defaultTarget: { low: null, high: 3 },
    source: 'Common practice: a fresh pond reads near 0; 3 ppt (0.3 %) is the usual upper level of a long salt treatment.',
  },
}

export interface TargetInUse extends WaterTarget {
  /** 'pond' when the pond set its own range; otherwise the default's source. */
  from: 'pond' | 'default'
  source: string
}

/** The range a reading is checked against; TAN's default depends on the test's pH and temperature. */
export function targetFor(parameter: WaterParameter, pondTargets: PondWaterTargets | null | undefined, test: { pH?: number | null, temperatureC?: number | null } = {}): TargetInUse {
  const own = pondTargets?.[parameter]
  if (own) return { ...own, from: 'pond', source: 'Set for this pond' }
  const info = WATER_PARAMETER_INFO[parameter]
  if (parameter === 'tanMgL') {
    const criterion = test.pH != null && test.temperatureC != null ? ammoniaChronicCriterionTanMgL(test.pH, test.temperatureC) : null
    return { low: null, high: criterion, from: 'default', source: info.source }
  }
  return { ...info.defaultTarget, from: 'default', source: info.source }
}

export function flagOf(value: number, target: WaterTarget): WaterFlag {
  if (target.low !== null && value < target.low) return 'low'
  if (target.high !== null && value > target.high) return 'high'
  return 'ok'
}

export type WaterReadings = Partial<Record<MeasuredWaterParameter, number | null>>

/** NH3-N from the test's own TAN, pH and temperature; null unless all three were measured. */
export function unionizedAmmoniaOf(test: WaterReadings): number | null {
  if (test.tanMgL == null || test.pH == null || test.temperatureC == null) return null
  return unionizedAmmonia(test.tanMgL, test.temperatureC, test.pH)
}

/**
 * A flag for each value present that has a range to check against. A TAN without pH and temperature
 * has no default range (the EPA criterion needs both), so it gets no flag unless the pond set one.
 */
export function waterFlags(test: WaterReadings, pondTargets?: PondWaterTargets | null): Partial<Record<WaterParameter, WaterFlag>> {
  const values: Partial<Record<WaterParameter, number | null>> = { ...test, unionizedAmmoniaNMgL: unionizedAmmoniaOf(test) }
  const flags: Partial<Record<WaterParameter, WaterFlag>> = {}
  for (const parameter of WATER_PARAMETERS) {
    const value = values[parameter]
    if (value == null) continue
    const target = targetFor(parameter, pondTargets, test)
    if (target.low === null && target.high === null) continue
    flags[parameter] = flagOf(value, target)
  }
  return flags
}
