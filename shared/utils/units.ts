// Unit conversion between metric and US customary units, with the exact factors of
// NIST SP 811 and Handbook 44 (all of them exact by definition, so round trips are clean).
import type { DecimalMark } from './decimal'

import type { UNIT_SYSTEMS } from './enums'

type UnitSystem = typeof UNIT_SYSTEMS[number]

export type UnitQuantity = 'mass' | 'length' | 'volume' | 'temperature'

interface LinearUnit {
  quantity: Exclude<UnitQuantity, 'temperature'>
  /** How many base units (g, mm, L) one of this unit is. */
  factor: number
}

// Source: NIST SP 811 / Handbook 44 — 1 lb = 0.45359237 kg, 1 oz = 28.349523125 g, 1 in = 2.54 cm,
// 1 ft = 0.3048 m, 1 US gal = 3.785411784 L, 1 imp gal = 4.54609 L.
const LINEAR_UNITS: Record<string, LinearUnit> = {
  'g': { quantity: 'mass', factor: 1 },
  'kg': { quantity: 'mass', factor: 1000 },
  'lb': { quantity: 'mass', factor: 453.59237 },
  'oz': { quantity: 'mass', factor: 28.349523125 },
  'mm': { quantity: 'length', factor: 1 },
  'cm': { quantity: 'length', factor: 10 },
  'm': { quantity: 'length', factor: 1000 },
  'in': { quantity: 'length', factor: 25.4 },
  'ft': { quantity: 'length', factor: 304.8 },
  'ml': { quantity: 'volume', factor: 0.001 },
  'l': { quantity: 'volume', factor: 1 },
  'm3': { quantity: 'volume', factor: 1000 },
  'us gal': { quantity: 'volume', factor: 3.785411784 },
  'imp gal': { quantity: 'volume', factor: 4.54609 },
}

const ALIASES: Record<string, string> = {
  'lbs': 'lb',
  'm³': 'm3',
  'gal': 'us gal',
  'usgal': 'us gal',
  'us gallon': 'us gal',
  'imperial gal': 'imp gal',
  'imp gallon': 'imp gal',
  'uk gal': 'imp gal',
  '°c': 'c',
  '℃': 'c',
  '°f': 'f',
  '℉': 'f',
}

const TEMPERATURE_UNITS = new Set(['c', 'f', 'k'])

function unitKey(unit: string): string {
  const key = String(unit).trim().replace(/\s+/g, ' ').toLowerCase()
  return ALIASES[key] ?? key
}

/** The quantity a unit measures, or null if the unit is unknown. */
export function unitQuantity(unit: string): UnitQuantity | null {
  const key = unitKey(unit)
  if (TEMPERATURE_UNITS.has(key)) return 'temperature'
  return LINEAR_UNITS[key]?.quantity ?? null
}

function toCelsius(value: number, key: string): number {
  if (key === 'f') return (value - 32) / 1.8
  if (key === 'k') return value - 273.15
  return value
}

function fromCelsius(celsius: number, key: string): number {
  if (key === 'f') return celsius * 1.8 + 32
  if (key === 'k') return celsius + 273.15
  return celsius
}

/**
 * Converts a value between units of the same quantity. Unit names are case-insensitive;
 * 'gal' means the US gallon. Throws for an unknown unit or units of different quantities.
 */
export function convert(value: number, from: string, to: string): number {
  const fromQuantity = unitQuantity(from)
  const toQuantity = unitQuantity(to)
  if (fromQuantity === null) throw new Error(`Unknown unit "${from}".`)
  if (toQuantity === null) throw new Error(`Unknown unit "${to}".`)
  if (fromQuantity !== toQuantity) {
    throw new Error(`Cannot convert ${fromQuantity} (${from}) to ${toQuantity} (${to}).`)
  }
  const fromKey = unitKey(from)
  const toKey = unitKey(to)
  if (fromKey === toKey) return value
  if (fromQuantity === 'temperature') return fromCelsius(toCelsius(value, fromKey), toKey)
  return (value * LINEAR_UNITS[fromKey]!.factor) / LINEAR_UNITS[toKey]!.factor
}

// Shown instead of a number when there is none to show.
const NO_VALUE = '—'

// Building an Intl.NumberFormat costs far more than formatting with one (a page of weighings made hundreds).
const numberFormats = new Map<number, Intl.NumberFormat>()

// Written in the reader's decimal style: "1,250.5" with a point, "1.250,5" with a comma.
function formatNumber(value: number, fractionDigits: number, mark: DecimalMark = 'point'): string {
  let format = numberFormats.get(fractionDigits)
  if (!format) numberFormats.set(fractionDigits, format = new Intl.NumberFormat('en-US', { minimumFractionDigits: fractionDigits, maximumFractionDigits: fractionDigits }))
  const text = format.format(value)
  return mark === 'point' ? text : text.replace(/[.,]/g, symbol => (symbol === '.' ? ',' : '.'))
}

function isMeasurable(value: number): boolean {
  return typeof value === 'number' && Number.isFinite(value) && value >= 0
}

/** "850 g", "1.25 kg" (metric); "12.1 oz", "2 lb 12.1 oz" (US). */
export function formatMass(grams: number, system: UnitSystem, mark: DecimalMark = 'point'): string {
  if (!isMeasurable(grams)) return NO_VALUE
  if (system === 'us') {
    const totalOunces = grams / 28.349523125
    // Round the ounces first so 15.96 oz becomes "1 lb 0.0 oz", not "0 lb 16.0 oz".
    const tenthsOfOunce = Math.round(totalOunces * 10)
    const pounds = Math.floor(tenthsOfOunce / 160)
    const ounces = (tenthsOfOunce - pounds * 160) / 10
    if (pounds === 0) return `${formatNumber(ounces, 1, mark)} oz`
    return `${formatNumber(pounds, 0, mark)} lb ${formatNumber(ounces, 1, mark)} oz`
  }
  // The unit follows the figure shown: 999.6 g would print as "1,000 g", so it reads as kilograms like 1000 g.
  if (Math.round(grams) >= 1000) return `${formatNumber(grams / 1000, 2, mark)} kg`
  // Small goldfish weigh a few grams: a decimal matters there, not on a koi (9.96 g prints as 10 g, not 10.0 g).
  return Math.round(grams * 10) < 100 ? `${formatNumber(grams, 1, mark)} g` : `${formatNumber(grams, 0, mark)} g`
}

/** A recorded weight with its grams spelled out: "1,250 g (1.25 kg)", so a weight typed in grams reads back as typed. */
export function formatMassWithGrams(grams: number, system: UnitSystem, mark: DecimalMark = 'point'): string {
  if (system === 'us' || !isMeasurable(grams) || Math.round(grams) < 1000) return formatMass(grams, system, mark)
  return `${formatNumber(grams, Number.isInteger(Number(grams.toFixed(1))) ? 0 : 1, mark)} g (${formatMass(grams, system, mark)})`
}

/** "40.0 cm" (metric); "15.7 in" (US). */
export function formatLength(centimetres: number, system: UnitSystem, mark: DecimalMark = 'point'): string {
  if (!isMeasurable(centimetres)) return NO_VALUE
  if (system === 'us') return `${formatNumber(centimetres / 2.54, 1, mark)} in`
  return `${formatNumber(centimetres, 1, mark)} cm`
}

/** "12,000 L" (metric); "3,170 US gal" (US). Under 100 one decimal is kept for tanks and tubs. */
export function formatVolume(litres: number, system: UnitSystem, mark: DecimalMark = 'point'): string {
  if (!isMeasurable(litres)) return NO_VALUE
  const value = system === 'us' ? litres / 3.785411784 : litres
  const text = formatNumber(value, value < 100 ? 1 : 0, mark)
  return system === 'us' ? `${text} US gal` : `${text} L`
}

/** "20.0 °C" (metric); "68.0 °F" (US). */
export function formatTemperature(celsius: number, system: UnitSystem, mark: DecimalMark = 'point'): string {
  if (typeof celsius !== 'number' || !Number.isFinite(celsius)) return NO_VALUE
  if (system === 'us') return `${formatNumber(celsius * 1.8 + 32, 1, mark)} °F`
  return `${formatNumber(celsius, 1, mark)} °C`
}
