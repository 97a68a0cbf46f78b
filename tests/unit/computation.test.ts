import { describe, it, expect } from 'vitest'
import * as computation from '../../shared/utils/computation'
import * as condition from '../../shared/utils/condition'
import * as doses from '../../shared/utils/doses'
import * as microchip from '../../shared/utils/microchip'
import * as pondVolume from '../../shared/utils/pond-volume'
import * as units from '../../shared/utils/units'
import * as water from '../../shared/utils/water'

describe('computation: single import point', () => {
  it.each([
    ['microchip', microchip],
    ['condition', condition],
    ['units', units],
    ['water', water],
    ['doses', doses],
    ['pond-volume', pondVolume],
  ] as const)('re-exports every export of %s unchanged', (_name, module) => {
    const names = Object.keys(module)
    expect(names.length).toBeGreaterThan(0)
    for (const name of names) {
      expect(computation[name as keyof typeof computation]).toBe(module[name as keyof typeof module])
    }
  })

  it('holds nothing beyond the six modules, and no name comes from two of them', () => {
    const moduleNames = [microchip, condition, units, water, doses, pondVolume].flatMap(m => Object.keys(m))
    expect(new Set(moduleNames).size).toBe(moduleNames.length)
    expect(Object.keys(computation).sort()).toEqual([...moduleNames].sort())
  })

  it.each([
    'parseMicrochip', 'isValidMicrochip', 'fultonK', 'relativeCondition', 'fitLengthWeight', 'standardWeight',
    'relativeWeight', 'specificGrowthRate', 'weightChangeAlert', 'convert', 'formatMass', 'formatLength',
    'formatVolume', 'formatTemperature', 'UNIT_SYSTEMS', 'unionizedAmmoniaFraction', 'unionizedAmmonia',
    'khToCaCO3', 'bathAmountMg', 'saltGramsPerLitre', 'saltForPondKg', 'injectionVolumeMl', 'DOSE_CAUTIONS',
  ])('exposes %s', (name) => {
    expect(computation).toHaveProperty(name)
  })
})
