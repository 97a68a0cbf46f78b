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

// ---- US EPA 2013 freshwater ammonia criteria (EPA-822-R-13-001) -------------------------------
// Criteria in mg/L total ammonia nitrogen (TAN) at the water's pH and temperature; the recommended
// defaults with mussels present. The headline values are 17 mg TAN/L acute (one-hour average) and
// 1.9 mg TAN/L chronic (30-day average) at pH 7 and 20 °C. Valid roughly pH 6.5–9.0 and 0–30 °C.

function epaInputs(pH: number, tempC: number) {
  return typeof pH === 'number' && Number.isFinite(pH) && pH >= 0 && pH <= 14
    && typeof tempC === 'number' && Number.isFinite(tempC) && tempC > -KELVIN_AT_0_C
}

/** Chronic criterion (CCC), mg TAN/L: 0.8876 · (0.0278/(1+10^(7.688−pH)) + 1.1994/(1+10^(pH−7.688))) · 2.126 · 10^(0.028·(20 − max(T, 7))). */
export function ammoniaChronicCriterionTanMgL(pH: number, tempC: number): number | null {
  if (!epaInputs(pH, tempC)) return null
  const pHTerm = 0.0278 / (1 + 10 ** (7.688 - pH)) + 1.1994 / (1 + 10 ** (pH - 7.688))
  return 0.8876 * pHTerm * 2.126 * 10 ** (0.028 * (20 - Math.max(tempC, 7)))
}

/** Acute criterion (CMC), mg TAN/L: 0.7249 · (0.0114/(1+10^(7.204−pH)) + 1.6181/(1+10^(pH−7.204))) · min(51.93, 23.12 · 10^(0.036·(20 − T))). */
export function ammoniaAcuteCriterionTanMgL(pH: number, tempC: number): number | null {
  if (!epaInputs(pH, tempC)) return null
  const pHTerm = 0.0114 / (1 + 10 ** (7.204 - pH)) + 1.6181 / (1 + 10 ** (pH - 7.204))
  return 0.7249 * pHTerm * Math.min(51.93, 23.12 * 10 ** (0.036 * (20 - tempC)))
}

// ---- other test-kit units ----------------------------------------------------------------------

/** °F → °C (NIST SP 811: °C = (°F − 32) / 1.8). */
export function fahrenheitToCelsius(tempF: number): number | null {
  return typeof tempF === 'number' && Number.isFinite(tempF) ? (tempF - 32) / 1.8 : null
}

/** °C → °F. */
export function celsiusToFahrenheit(tempC: number): number | null {
  return typeof tempC === 'number' && Number.isFinite(tempC) ? tempC * 1.8 + 32 : null
}

/** Salinity in percent → parts per thousand (1 % = 10 ‰). Pond salt is dosed by weight per volume, where the two agree. */
export function salinityPercentToPpt(percent: number): number | null {
  return scaled(percent, 10)
}

/** Parts per thousand → percent. */
export function salinityPptToPercent(ppt: number): number | null {
  return scaled(ppt, 0.1)
}

/** General hardness: 1 dGH = 10 mg/L CaO = 17.848 mg/L as CaCO3, like KH. */
export function ghToCaCO3(dGH: number): number | null {
  return scaled(dGH, CACO3_MG_L_PER_DKH)
}

/** mg/L as CaCO3 → dGH. */
export function caCO3ToGh(caCO3MgL: number): number | null {
  return scaled(caCO3MgL, 1 / CACO3_MG_L_PER_DKH)
}
