import { describe, expect, it } from 'vitest'
import { parseMicrochip } from '../../shared/utils/microchip'
import { fultonK } from '../../shared/utils/condition'
import { courtyardPondFish, gardenPondFish, whitlockPondFish } from '../../scripts/seed/fish'
import { GROWTH } from '../../scripts/seed/histories'
import { decimalYear, hatchDate, lengthAt, weightAt } from '../../scripts/seed/growth'
import { fishPattern, fishSvg } from '../../scripts/seed/fish-patterns'

const allFish = [...gardenPondFish, ...courtyardPondFish, ...whitlockPondFish]

describe('the demo scenario', () => {
  it('uses only test transponder numbers (ISO 11784: code 999 is reserved for test transponders)', () => {
    const chips = allFish.flatMap(f => (f.microchip ? [f.microchip] : []))
    expect(chips.length).toBeGreaterThan(5)
    for (const chip of chips) {
      const parsed = parseMicrochip(chip)
      expect(parsed, chip).toMatchObject({ ok: true, kind: 'test', code: '999' })
    }
    expect(new Set(chips).size).toBe(chips.length)
  })

  it('grows pond-hatched fry at garden-pond rates (common practice: 5–8 cm in the first October, 20–28 cm after the second summer)', () => {
    const pebble = GROWTH.Pebble!
    const hatched = hatchDate(pebble.hatchYear)
    const firstOctober = lengthAt(pebble, hatched, decimalYear(new Date('2024-10-01T00:00:00Z')))
    const secondOctober = lengthAt(pebble, hatched, decimalYear(new Date('2025-10-01T00:00:00Z')))
    expect(firstOctober).toBeGreaterThan(5)
    expect(firstOctober).toBeLessThan(8)
    expect(secondOctober).toBeGreaterThan(20)
    expect(secondOctober).toBeLessThan(28)
    // No growth through the winter (Somers 1988 seasonal growth with C = 1).
    const december = lengthAt(pebble, hatched, decimalYear(new Date('2024-12-15T00:00:00Z')))
    const march = lengthAt(pebble, hatched, decimalYear(new Date('2025-03-15T00:00:00Z')))
    expect(march - december).toBeLessThan(0.6)
  })

  it('gives fancy goldfish a rounder build (higher Fulton K) than koi', () => {
    const k = (name: string, length: number) => fultonK(weightAt(GROWTH[name]!, length), length)!
    expect(k('Button', 10)).toBeGreaterThan(3 * k('Hoshi', 60))
    expect(k('Mochi', 10)).toBeGreaterThan(3 * k('Bento', 60))
  })

  it('moves young koi out of the small pond before they outgrow it', () => {
    for (const name of ['Yuzu', 'Kenzo']) {
      const g = GROWTH[name]!
      expect(g.movedTo?.pond).toBe('garden')
      const atMove = lengthAt(g, hatchDate(g.hatchYear), decimalYear(new Date(`${g.movedTo!.on}T00:00:00Z`)))
      expect(atMove).toBeLessThan(45)
    }
  })

  it('draws the same fish from the same seed, and a different fish from another', () => {
    const scene = { width: 320, height: 240 }
    expect(fishSvg(fishPattern(7, 'koi', 'Kohaku'), scene)).toBe(fishSvg(fishPattern(7, 'koi', 'Kohaku'), scene))
    expect(fishSvg(fishPattern(7, 'koi', 'Kohaku'), scene)).not.toBe(fishSvg(fishPattern(8, 'koi', 'Kohaku'), scene))
  })
})
