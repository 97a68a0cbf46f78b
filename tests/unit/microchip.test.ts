import { describe, it, expect } from 'vitest'
import { isValidMicrochip, parseMicrochip, MICROCHIP_MAX_NATIONAL_ID } from '../../shared/utils/microchip'

// Source: ISO 11784 / 11785 as summarised in docs/references.md — 10-bit code + 38-bit national id,
// shown as 3 + 12 digits; 999 test transponder; 000 invalid; 900–998 manufacturer (ICAR); others ISO 3166-1 numeric.
// Rows marked "derived" are built from that structure, not copied from the standard's own examples.

describe('parseMicrochip: well-formed numbers', () => {
  it.each([
    // Source: docs/references.md, example of a well-formed test-transponder number.
    { label: 'docs/references.md example 999123456789012', input: '999123456789012', code: '999', number: '123456789012', kind: 'test' },
    // Derived: same number with the spaces and hyphens readers and paper forms use.
    { label: 'derived: spaces and hyphens are stripped', input: ' 999 1234-5678 9012 ', code: '999', number: '123456789012', kind: 'test' },
    // Derived: 2^38 − 1 = 274877906943 is the largest 38-bit id, so it must pass.
    { label: 'derived: max 38-bit id 274877906943 passes', input: '250274877906943', code: '250', number: '274877906943', kind: 'country' },
    // Derived: lowest and highest country codes (001, 899) and a zero id are all structurally valid.
    { label: 'derived: code 001 is a country code', input: '001000000000000', code: '001', number: '000000000000', kind: 'country' },
    { label: 'derived: code 899 is a country code', input: '899000000000001', code: '899', number: '000000000001', kind: 'country' },
    // Derived: 900 and 998 bound the manufacturer range.
    { label: 'derived: 900 is a manufacturer code', input: '900123456789012', code: '900', number: '123456789012', kind: 'manufacturer' },
    { label: 'derived: 998 is a manufacturer code', input: '998123456789012', code: '998', number: '123456789012', kind: 'manufacturer' },
    // Derived: 999 marks a test transponder.
    { label: 'derived: 999 marks a test transponder', input: '999000000000001', code: '999', number: '000000000001', kind: 'test' },
  ])('$label', ({ input, code, number, kind }) => {
    const result = parseMicrochip(input)
    expect(result).toEqual({ ok: true, code, number, kind, normalized: `${code}${number}` })
    expect(isValidMicrochip(input)).toBe(true)
  })
})

describe('parseMicrochip: malformed numbers', () => {
  it.each([
    // Derived: 274877906944 = 2^38 does not fit in 38 bits.
    { label: 'derived: id 274877906944 (2^38) fails', input: '250274877906944', reasonMatch: /274877906943/ },
    { label: 'derived: 999999999999 is above 38 bits', input: '999999999999999', reasonMatch: /38 bits/ },
    // Source: docs/references.md — 000 is not a valid code.
    { label: 'code 000 fails', input: '000123456789012', reasonMatch: /000/ },
    // Derived: the decimal form is exactly 15 digits.
    { label: 'derived: 14 digits fail', input: '99912345678901', reasonMatch: /15 digits.*14/ },
    { label: 'derived: 16 digits fail', input: '9991234567890123', reasonMatch: /15 digits.*16/ },
    { label: 'derived: letters fail', input: '99912345678901A', reasonMatch: /only digits/ },
    { label: 'derived: hexadecimal form is not the decimal form', input: '3E7.1CBE991A14', reasonMatch: /only digits/ },
    { label: 'derived: dots are not a separator', input: '999.123.456.789.012', reasonMatch: /only digits/ },
    { label: 'derived: empty text fails', input: '   ', reasonMatch: /empty/ },
  ])('$label', ({ input, reasonMatch }) => {
    const result = parseMicrochip(input)
    expect(result.ok).toBe(false)
    if (!result.ok) expect(result.reason).toMatch(reasonMatch)
    expect(isValidMicrochip(input)).toBe(false)
  })

  it('derived: the 38-bit limit constant is 2^38 − 1', () => {
    expect(MICROCHIP_MAX_NATIONAL_ID).toBe(2 ** 38 - 1)
  })
})
