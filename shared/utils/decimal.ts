// One reader for every number a person types or a spreadsheet holds. The decimal mark is the
// person's setting, never guessed: "1,250" is 1250 for a point-decimal reader and refused as
// ambiguous for nobody, while "1,25" is refused for them because it cannot be a thousands group.

import type { DECIMAL_MARKS } from './enums'

export type DecimalMark = typeof DECIMAL_MARKS[number]

export type DecimalReading = { ok: true, value: number } | { ok: false, message: string }

const SYMBOL: Record<DecimalMark, { decimal: string, group: string }> = {
  point: { decimal: '.', group: ',' },
  comma: { decimal: ',', group: '.' },
}

/** Digits grouped in threes by `group` (or by spaces), or plain digits. */
function integerPart(text: string, group: string) {
  const escaped = group === '.' ? '\\.' : group
  return new RegExp(`^(\\d{1,3}(${escaped}\\d{3})+|\\d{1,3}( \\d{3})+|\\d+)$`).test(text)
}

export function readDecimal(input: string, decimalMark: DecimalMark): DecimalReading {
  const { decimal, group } = SYMBOL[decimalMark]
  const text = String(input ?? '').trim().replace(/[\u00a0\u202f]/g, ' ')
  const example = decimalMark === 'point' ? '1250 or 1,250 or 12.5' : '1250 or 1.250 or 12,5'
  if (text === '') return { ok: false, message: 'Enter a number.' }
  const match = /^([+-]?)(.*)$/.exec(text)!
  const sign = match[1] === '-' ? -1 : 1
  const body = match[2]!
  const decimalAt = body.lastIndexOf(decimal)
  const whole = decimalAt === -1 ? body : body.slice(0, decimalAt)
  const fraction = decimalAt === -1 ? '' : body.slice(decimalAt + 1)
  if (body.indexOf(decimal) !== decimalAt || (decimalAt !== -1 && !/^\d+$/.test(fraction))) {
    return { ok: false, message: `Not a number we can read. Write it like ${example}.` }
  }
  if (whole === '' && fraction !== '') return { ok: true, value: sign * Number(`0.${fraction}`) }
  if (!integerPart(whole, group)) {
    if (whole.includes(group)) {
      const meant = whole.replace(group, decimal)
      return {
        ok: false,
        message: decimalMark === 'point'
          ? `"${text}" is ambiguous: your decimal mark is a point. Write ${meant.replace(',', '.')} for a decimal, or group thousands in threes (1,250).`
          : `"${text}" is ambiguous: your decimal mark is a comma. Write ${meant.replace('.', ',')} for a decimal, or group thousands in threes (1.250).`,
      }
    }
    return { ok: false, message: `Not a number we can read. Write it like ${example}.` }
  }
  const digits = whole.replaceAll(group, '').replaceAll(' ', '')
  const value = sign * Number(fraction === '' ? digits : `${digits}.${fraction}`)
  return Number.isFinite(value) ? { ok: true, value } : { ok: false, message: 'That number is too large.' }
}

/** The number a person typed, read with their decimal mark; null when it is not a number or is ambiguous. */
export function parseDecimal(text: string, decimalMark: DecimalMark): number | null {
  const reading = readDecimal(text, decimalMark)
  return reading.ok ? reading.value : null
}

// One formatter per precision: building one costs far more than using it.
const decimalFormats = new Map<number, Intl.NumberFormat>()

/**
 * A number written back the way the person reads numbers: "1,250" / "12.5" with a point,
 * "1.250" / "12,5" with a comma. Thousands are grouped in threes, as the parser accepts them.
 */
export function formatDecimal(value: number, decimalMark: DecimalMark, maximumFractionDigits = 3): string {
  if (!Number.isFinite(value)) return ''
  let format = decimalFormats.get(maximumFractionDigits)
  if (!format) decimalFormats.set(maximumFractionDigits, format = new Intl.NumberFormat('en-US', { maximumFractionDigits, useGrouping: true }))
  const pointText = format.format(value)
  if (decimalMark === 'point') return pointText
  return pointText.replace(/[.,]/g, symbol => (symbol === '.' ? ',' : '.'))
}

/** The decimal mark a browser locale writes ("de-DE" → comma, "en-US" → point); point when unknown. */
export function decimalMarkOfLocale(locale: string | undefined): DecimalMark {
  try {
    const parts = new Intl.NumberFormat(locale || 'en-US').formatToParts(1.5)
    return parts.find(part => part.type === 'decimal')?.value === ',' ? 'comma' : 'point'
  }
  catch {
    return 'point'
  }
}

/**
 * A typed field into what the schema receives: nothing for an empty field, the number, or NaN when
 * the text is refused, so the schema refuses it too and nothing misread is ever sent.
 */
export function typedDecimal(text: string | null | undefined, decimalMark: DecimalMark): number | undefined {
  if (String(text ?? '').trim() === '') return undefined
  return parseDecimal(String(text), decimalMark) ?? Number.NaN
}
