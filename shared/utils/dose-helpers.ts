// What the dose helpers add to the arithmetic in doses.ts: rounding to the tools people measure with,
// the salt still to add after the last salinity reading, and the age of the weight an injection uses.
// The app never chooses a dose: the person types it; these only round and check the arithmetic.
import { saltForPondKg } from './doses'

/** Shown, unfolded, beside every dose helper. */
export const DOSE_HELPER_CAUTIONS: readonly string[] = Object.freeze([
  'For use by or under the direction of a licensed veterinarian. Fintrail does the arithmetic only; it does not choose or check a dose.',
  'Check the drug, the dose and the species against a current formulary and the product label before treating.',
  'Follow local rules on veterinary medicines, chemicals in ponds and the discharge of treated water.',
  'Aerate the water throughout a bath or pond treatment.',
  'Filters, UV clarifiers and skimmers may need bypassing during a treatment: some drugs kill the filter bacteria, and UV breaks some drugs down.',
])

export interface Rounded {
  /** The amount to measure, rounded to the tool's marks. */
  value: number
  /** The step it was rounded to, in the same unit. */
  step: number
  /** The tool that step belongs to, in words. */
  tool: string
  /** How far the rounded value is from the exact one, as a fraction of the exact one. */
  relativeError: number
}

function roundToStep(exact: number, step: number, tool: string): Rounded {
  // Rounded through the step's own decimals so 0.1 steps do not print as 0.30000000000000004.
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9))
  const value = Number((Math.round(exact / step) * step).toFixed(decimals))
  return { value, step, tool, relativeError: exact > 0 ? Math.abs(value - exact) / exact : 0 }
}

/**
 * Syringe volume rounded to the marks of the smallest usual syringe that holds it (common practice:
 * 1 mL syringes are marked in 0.01 mL, 3 mL in 0.1 mL, 10 mL in 0.2 mL, 20 mL and up in 1 mL).
 */
export function roundForSyringe(ml: number): Rounded | null {
  if (!Number.isFinite(ml) || ml <= 0) return null
  if (ml <= 1) return roundToStep(ml, 0.01, '1 mL syringe, marked every 0.01 mL')
  if (ml <= 3) return roundToStep(ml, 0.1, '3 mL syringe, marked every 0.1 mL')
  if (ml <= 10) return roundToStep(ml, 0.2, '10 mL syringe, marked every 0.2 mL')
  return roundToStep(ml, 1, '20 mL or larger syringe, marked every 1 mL')
}

/** Below this a syringe cannot measure reliably: the helper says to dilute the drug first (common practice). */
export const SMALLEST_MEASURABLE_ML = 0.05

/**
 * A weight of powder or salt in grams, rounded for the scale that suits it (common practice:
 * a jeweller's scale reads 0.01 g up to about 100 g; a kitchen scale reads 1 g up to about 5 kg;
 * a platform or bathroom scale reads 0.1 kg).
 */
export function roundForScale(grams: number): Rounded | null {
  if (!Number.isFinite(grams) || grams <= 0) return null
  if (grams < 100) return roundToStep(grams, 0.01, 'jeweller’s scale, reading 0.01 g')
  if (grams < 5000) return roundToStep(grams, 1, 'kitchen scale, reading 1 g')
  return roundToStep(grams, 100, 'platform or bathroom scale, reading 0.1 kg')
}

export type SaltPlan
  = | { ok: true, addKg: number, fromPercent: number, toPercent: number }
    | { ok: false, message: string }

/**
 * Salt to add to bring a pond from its last measured salinity up to a target, by weight per volume
 * (percent × 10 = g/L). Salt only leaves a pond with water changes, so a pond already at or above
 * the target needs none: that is refused with a message rather than answered with a negative amount.
 */
export function saltToRaise(targetPercent: number, currentPercent: number | null, volumeL: number): SaltPlan {
  const from = currentPercent ?? 0
  if (!Number.isFinite(targetPercent) || targetPercent <= 0) return { ok: false, message: 'Enter the salt level to reach, more than 0 %.' }
  if (targetPercent > 3) return { ok: false, message: 'More than 3 % is a short dip, not a pond level: use the bath helper with the dip’s own volume.' }
  if (!Number.isFinite(volumeL) || volumeL <= 0) return { ok: false, message: 'Enter the volume of water, more than 0.' }
  if (!Number.isFinite(from) || from < 0) return { ok: false, message: 'The measured salinity cannot be negative.' }
  if (from >= targetPercent) return { ok: false, message: `The last test already reads ${from} %, at or above ${targetPercent} %: add no salt. Salt only leaves with water changes.` }
  const addKg = saltForPondKg(targetPercent - from, volumeL)
  return addKg === null ? { ok: false, message: 'These numbers give no amount.' } : { ok: true, addKg, fromPercent: from, toPercent: targetPercent }
}

/** A weight older than this is flagged before an injection is worked out from it. */
export const WEIGHT_STALE_DAYS = 90

/** Whole days between a weighing and now (UTC calendar days are close enough for a 90-day warning). */
export function daysSince(at: string | Date, now: Date = new Date()): number {
  const then = at instanceof Date ? at : new Date(at)
  return Math.floor((now.getTime() - then.getTime()) / 86_400_000)
}
