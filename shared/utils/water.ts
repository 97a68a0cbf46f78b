// Water chemistry for pond tests: un-ionized ammonia and the "as N" conversions test kits differ on.
// Concentrations may be 0 (a clean test), so only negative or non-finite values give null.

function isConcentration(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value) && value >= 0
}

const KELVIN_AT_0_C = 273.15

/**
 * Fraction of total ammonia present as un-ionized NH3 in fresh water.
 * Source: Emerson, Russo, Lund & Thurston 1975, J. Fish. Res. Board Can. 32:2379-2383:
 * pKa = 0.09018 + 2729.92 / T (T in kelvin); fraction = 1 / (10^(pKa − pH) + 1).
 * Not valid for salt water. Null for a pH outside 0–14 or a temperature at or below absolute zero.
 */
export function unionizedAmmoniaFraction(tempC: number, pH: number): number | null {
  if (typeof tempC !== 'number' || !Number.isFinite(tempC) || tempC <= -KELVIN_AT_0_C) return null
  if (typeof pH !== 'number' || !Number.isFinite(pH) || pH < 0 || pH > 14) return null
  const pKa = 0.09018 + 2729.92 / (tempC + KELVIN_AT_0_C)
  return 1 / (10 ** (pKa - pH) + 1)
}

/**
 * Un-ionized ammonia from total ammonia (TAN). The answer is on the same basis as the input:
 * TAN as N gives NH3-N, TAN as NH3 gives NH3 (convert with nh3NToNh3 if needed).
 */
export function unionizedAmmonia(totalAmmoniaMgL: number, tempC: number, pH: number): number | null {
  if (!isConcentration(totalAmmoniaMgL)) return null
  const fraction = unionizedAmmoniaFraction(tempC, pH)
  return fraction === null ? null : totalAmmoniaMgL * fraction
}

// Ratios of molar masses (docs/references.md): NH3 17.031 / N 14.007; NO2⁻ / N 3.2844; NO3⁻ / N 4.4266.
const NH3_PER_N = 17.031 / 14.007
const NO2_PER_N = 3.2844
const NO3_PER_N = 4.4266

function scaled(value: number, factor: number): number | null {
  return isConcentration(value) ? value * factor : null
}

/** mg/L NH3 → mg/L NH3-N. */
export function nh3ToNh3N(nh3MgL: number): number | null {
  return scaled(nh3MgL, 1 / NH3_PER_N)
}

/** mg/L NH3-N → mg/L NH3. */
export function nh3NToNh3(nh3NMgL: number): number | null {
  return scaled(nh3NMgL, NH3_PER_N)
}

/** mg/L NO2⁻ → mg/L NO2-N. */
export function no2ToNo2N(no2MgL: number): number | null {
  return scaled(no2MgL, 1 / NO2_PER_N)
}

/** mg/L NO2-N → mg/L NO2⁻. */
export function no2NToNo2(no2NMgL: number): number | null {
  return scaled(no2NMgL, NO2_PER_N)
}

/** mg/L NO3⁻ → mg/L NO3-N. */
export function no3ToNo3N(no3MgL: number): number | null {
  return scaled(no3MgL, 1 / NO3_PER_N)
}

/** mg/L NO3-N → mg/L NO3⁻. */
export function no3NToNo3(no3NMgL: number): number | null {
  return scaled(no3NMgL, NO3_PER_N)
}

// 1 dKH = 10 mg/L CaO = 17.848 mg/L as CaCO3 (molar masses, docs/references.md).
const CACO3_MG_L_PER_DKH = 17.848

/** Carbonate hardness in German degrees (dKH) → alkalinity in mg/L as CaCO3. */
export function khToCaCO3(dKH: number): number | null {
  return scaled(dKH, CACO3_MG_L_PER_DKH)
}

/** Alkalinity in mg/L as CaCO3 → dKH. */
export function caCO3ToKh(caCO3MgL: number): number | null {
  return scaled(caCO3MgL, 1 / CACO3_MG_L_PER_DKH)
}
