// Treatment arithmetic. The app multiplies and divides the numbers a veterinarian enters;
// it never chooses, suggests or checks a dose. Show DOSE_CAUTIONS wherever these results appear.
// Inputs that are not finite and positive give null, so an empty field shows no result.

function isPositiveNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value) && value > 0
}

export const DOSE_CAUTIONS: readonly string[] = Object.freeze([
  'For use by or under the direction of a licensed veterinarian. Fintrail does arithmetic only; it does not choose or check a dose.',
  'Check every drug, dose and route against a current formulary and the product label before treating.',
  'Follow local laws and codes on prescription drugs, chemicals in ponds, and disposal of treated water.',
  'Tricaine methanesulfonate (MS-222) is acidic in solution: buffer it with sodium bicarbonate before fish go in.',
  'MS-222 powder irritates eyes, skin and airways: handle it with gloves, a mask and goggles.',
  'Check whether local rules treat the fish as food-producing (koi and goldfish can count as food fish in some places); if they do, a withdrawal period applies after treatment (in the US, 21 days after MS-222).',
  'For euthanasia follow the AVMA Guidelines for the Euthanasia of Animals (2020).',
])

/**
 * Shown beside every anaesthesia form, after the first line of DOSE_CAUTIONS. Aeration, recovery in
 * water from the same source, and an effect that varies with temperature and size are common practice,
 * as reviewed by Neiffer & Stamper 2009, ILAR Journal 50(4):343-360 (docs/references.md; recalled from memory).
 */
export const ANAESTHESIA_CAUTIONS: readonly string[] = Object.freeze([
  'Aerate the anaesthetic bath throughout, and recover the fish in clean, well-aerated water from the same source (same temperature and chemistry).',
  'How fast and how deep an anaesthetic acts depends on water temperature and the size of the fish: watch the fish and its gill movements, not the clock.',
  DOSE_CAUTIONS[3]!,
  DOSE_CAUTIONS[4]!,
  DOSE_CAUTIONS[5]!,
])

/** Bath: amount (mg) = concentration (mg/L) × water volume (L). */
export function bathAmountMg(concentrationMgL: number, volumeL: number): number | null {
  if (!isPositiveNumber(concentrationMgL) || !isPositiveNumber(volumeL)) return null
  return concentrationMgL * volumeL
}

/** Salt as weight per volume: percent × 10 = g/L (0.3 % = 3 g/L). */
export function saltGramsPerLitre(percent: number): number | null {
  if (!isPositiveNumber(percent)) return null
  return percent * 10
}

/** Salt to add for a whole pond, in kg, to reach `percent` (w/v) from fresh water. */
export function saltForPondKg(percent: number, volumeL: number): number | null {
  const gramsPerLitre = saltGramsPerLitre(percent)
  if (gramsPerLitre === null || !isPositiveNumber(volumeL)) return null
  return (gramsPerLitre * volumeL) / 1000
}

/** Drug amount for one fish: dose (mg/kg) × body weight (kg). */
export function doseAmountMg(doseMgPerKg: number, weightKg: number): number | null {
  if (!isPositiveNumber(doseMgPerKg) || !isPositiveNumber(weightKg)) return null
  return doseMgPerKg * weightKg
}

/** Injection: volume (mL) = dose (mg/kg) × weight (kg) / concentration (mg/mL). */
export function injectionVolumeMl(doseMgPerKg: number, weightKg: number, concentrationMgPerMl: number): number | null {
  const amountMg = doseAmountMg(doseMgPerKg, weightKg)
  if (amountMg === null || !isPositiveNumber(concentrationMgPerMl)) return null
  return amountMg / concentrationMgPerMl
}

/**
 * Which volume a dilution's `volume` means:
 * - 'final': the volume after mixing, stock included (C1 · V1 = C2 · V2). The default.
 * - 'water': the water the stock is poured into; the stock then adds to it,
 *   so C1 · Vstock = C2 · (Vwater + Vstock).
 */
export type DilutionConvention = 'final' | 'water'

export interface DilutionOptions {
  convention?: DilutionConvention
}

export interface DilutionPlan {
  convention: DilutionConvention
  stockVolume: number
  waterVolume: number
  finalVolume: number
}

/**
 * Stock and water volumes to reach a target concentration. Concentrations share one unit
 * (for example mg/mL and mg/mL, or %), volumes another (the answer is in the unit of `volume`).
 * Null unless 0 < target < stock: a stock cannot be diluted up to its own strength or beyond.
 */
export function dilutionPlan(
  stockConcentration: number,
  targetConcentration: number,
  volume: number,
  options: DilutionOptions = {},
): DilutionPlan | null {
  const convention = options.convention ?? 'final'
  if (!isPositiveNumber(stockConcentration) || !isPositiveNumber(targetConcentration) || !isPositiveNumber(volume)) return null
  if (targetConcentration >= stockConcentration) return null
  if (convention === 'final') {
    const stockVolume = (targetConcentration * volume) / stockConcentration
    return { convention, stockVolume, waterVolume: volume - stockVolume, finalVolume: volume }
  }
  if (convention === 'water') {
    const stockVolume = (targetConcentration * volume) / (stockConcentration - targetConcentration)
    return { convention, stockVolume, waterVolume: volume, finalVolume: volume + stockVolume }
  }
  return null
}

/** Stock volume alone; see dilutionPlan for the conventions. */
export function dilutionStockVolume(
  stockConcentration: number,
  targetConcentration: number,
  volume: number,
  options: DilutionOptions = {},
): number | null {
  return dilutionPlan(stockConcentration, targetConcentration, volume, options)?.stockVolume ?? null
}
