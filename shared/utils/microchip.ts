// ISO 11784 / 11785 animal transponder numbers in their 15-digit decimal form:
// a 3-digit country or manufacturer code followed by the 12-digit national identification number.

/** Largest national identification number: the code holds it in 38 bits (2^38 − 1). */
export const MICROCHIP_MAX_NATIONAL_ID = 274_877_906_943

export type MicrochipKind = 'country' | 'manufacturer' | 'test'

export type MicrochipParseResult
  = | { ok: true, code: string, number: string, kind: MicrochipKind, normalized: string }
    | { ok: false, reason: string }

/** Classifies a 3-digit code (001–999); 000 is not a valid code. */
export function microchipCodeKind(code: number): MicrochipKind | null {
  if (!Number.isInteger(code) || code < 1 || code > 999) return null
  if (code === 999) return 'test'
  if (code >= 900) return 'manufacturer'
  // ISO 3166-1 numeric range; we accept any code here rather than copy a country list that ages.
  return 'country'
}

export function parseMicrochip(text: string): MicrochipParseResult {
  if (typeof text !== 'string') return { ok: false, reason: 'Microchip number must be text.' }
  // Readers and paper records group the digits with spaces or hyphens; nothing else is a separator.
  const normalized = text.trim().replace(/[\s-]+/g, '')
  if (normalized.length === 0) return { ok: false, reason: 'Microchip number is empty.' }
  if (!/^\d+$/.test(normalized)) {
    return { ok: false, reason: 'Microchip number may contain only digits (spaces and hyphens are allowed between them).' }
  }
  if (normalized.length !== 15) {
    return { ok: false, reason: `Microchip number must have exactly 15 digits; this one has ${normalized.length}.` }
  }
  const code = normalized.slice(0, 3)
  const number = normalized.slice(3)
  const kind = microchipCodeKind(Number(code))
  if (kind === null) return { ok: false, reason: 'Microchip code 000 is not a valid country or manufacturer code.' }
  if (Number(number) > MICROCHIP_MAX_NATIONAL_ID) {
    return {
      ok: false,
      reason: `The 12-digit identification number must be at most ${MICROCHIP_MAX_NATIONAL_ID} (it is stored in 38 bits).`,
    }
  }
  return { ok: true, code, number, kind, normalized }
}

export function isValidMicrochip(text: string): boolean {
  return parseMicrochip(text).ok
}
