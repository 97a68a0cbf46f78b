import { describe, it, expect } from 'vitest'
import * as computation from '../../shared/utils/computation'

// The single import point for tools outside the app: each check runs a published worked example through it,
// so a name missing from it, or a formula changed behind it, fails here. Sources as in docs/references.md.
describe('computation: the published worked examples through the single import point', () => {
  it('Fulton K of 1000 g at 40 cm is 1.5625 (Fulton 1904; Nash, Valencia & Geffen 2006)', () => {
    expect(computation.fultonK(1000, 40)).toBeCloseTo(1.5625, 12)
  })

  it('W = 0.0163 · L^2.935 gives about 820.8 g at 40 cm (common carp, Yılmaz & Cerim 2022)', () => {
    expect(computation.predictedWeight(40, 0.0163, 2.935)).toBeCloseTo(820.8, 1)
  })

  it('standard weight of common carp at TL 400 mm is about 909.9 g, so 1000 g has Wr about 109.9 (Bister et al. 2000)', () => {
    expect(computation.standardWeight('koi', 400)).toBeCloseTo(909.9, 1)
    expect(computation.relativeWeight('koi', 1000, 400)).toBeCloseTo(109.9, 1)
  })

  it('TAN 1.0 mg/L at 24 °C and pH 8.0 holds about 0.0502 mg/L un-ionized ammonia (Emerson et al. 1975; UF/IFAS FA16 worked example)', () => {
    expect(computation.unionizedAmmonia(1, 24, 8)).toBeCloseTo(0.0502, 3)
  })

  it('16 in is exactly 40.64 cm and 1 lb exactly 453.59237 g (NIST SP 811)', () => {
    expect(computation.convert(16, 'in', 'cm')).toBeCloseTo(40.64, 12)
    expect(computation.convert(1, 'lb', 'g')).toBeCloseTo(453.59237, 9)
  })

  it('999123456789012 is a well-formed test-transponder number and 000123456789012 is not valid (ISO 11784)', () => {
    expect(computation.isValidMicrochip('999123456789012')).toBe(true)
    expect(computation.isValidMicrochip('000123456789012')).toBe(false)
  })

  it('a 4 × 3 m pond 1 m deep holds 12,000 L (L · W · D; common practice, CSU Extension 6.400)', () => {
    expect(computation.rectanglePondLitres(4, 3, 1)).toBeCloseTo(12_000, 9)
  })

  it('a 1 % salt level is 10 g per litre, so 12,000 L need 120 kg (derived: 1 % = 10 g/L)', () => {
    expect(computation.saltGramsPerLitre(1)).toBeCloseTo(10, 12)
    expect(computation.saltForPondKg(1, 12_000)).toBeCloseTo(120, 9)
  })
})
