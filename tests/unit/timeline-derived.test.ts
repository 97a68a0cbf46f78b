import { describe, expect, it } from 'vitest'
import {
  analyteFlag, enucleationConflict, eyeState, isCurrentTreatment, isEnucleation, isProlongedRecovery, measurementDerived, relationWords, treatmentLastDay,
} from '../../shared/utils/timeline-derived'
import { kindsOffered, amendDecision, doseDecision, writeDecision } from '../../shared/utils/timeline-rules'
import { entryCreateSchema, treatmentData } from '../../shared/utils/timeline-schemas'
import { upgradeEntryData } from '../../shared/utils/timeline-upgrade'

describe('measurementDerived', () => {
  it.each([
    // Source: docs/references.md worked example (Fulton 1904; Nash et al. 2006): 1000 g at 40 cm → K = 1.5625;
    // Bister et al. 2000: TL 400 mm → Ws ≈ 909.9 g, so 1000 g → Wr ≈ 109.9.
    { data: { weightG: 1000, lengthCm: 40, lengthType: 'total' as const }, species: 'koi', k: 1.5625, wr: 109.9 },
    // No standard weight is published for goldfish (docs/references.md): Wr stays empty.
    { data: { weightG: 1000, lengthCm: 40, lengthType: 'total' as const }, species: 'goldfish', k: 1.5625, wr: null },
    // The standard-weight equation uses total length; a fork length gives K but no Wr.
    { data: { weightG: 1000, lengthCm: 40, lengthType: 'fork' as const }, species: 'koi', k: 1.5625, wr: null },
    { data: { weightG: 1000, lengthType: 'total' as const }, species: 'koi', k: null, wr: null },
  ])('$species $data.lengthType → K $k, Wr $wr', ({ data, species, k, wr }) => {
    const derived = measurementDerived(data, species)
    if (k === null) expect(derived.conditionK).toBeNull()
    else expect(derived.conditionK).toBeCloseTo(k, 10)
    if (wr === null) expect(derived.relativeWeight).toBeNull()
    else expect(derived.relativeWeight).toBeCloseTo(wr, 1)
  })
})

describe('eyes', () => {
  it('folds removals into a header line and refuses a second removal of the same eye', () => {
    const left = { entryId: 'a', on: '2023-04-18', side: 'left' as const }
    const right = { entryId: 'b', on: '2026-05-02', side: 'right' as const }
    expect(eyeState([]).summary).toBe('')
    expect(eyeState([right, left]).summary).toBe('left eye removed 2023-04-18; right eye removed 2026-05-02 — no eyes')
    expect(eyeState([{ entryId: 'c', on: '2024-01-01', side: 'both' }]).summary).toBe('both eyes removed 2024-01-01 — no eyes')
    expect(enucleationConflict(eyeState([left]), 'right')).toBeNull()
    expect(enucleationConflict(eyeState([left]), 'both')).toBe('The left eye was already removed on 2023-04-18: it cannot be removed again')
    expect(enucleationConflict(eyeState([left, right]), 'both')).toMatch(/left eye .* and the right eye was already removed on 2026-05-02/)
  })

  it('reads an eye removal from the procedure code, never from its wording', () => {
    expect(isEnucleation({ code: 'enucleation', name: 'anything at all' })).toBe(true)
    expect(isEnucleation({ code: 'mass_removal', name: 'Removal of the left eye' })).toBe(false)
    expect(isEnucleation({ name: 'enucleation' })).toBe(false)
  })

  it('brings entries of an earlier form to the current one', () => {
    expect(upgradeEntryData('procedure', { name: 'Enucleation, left', side: 'left', surgeon: 'Dr A' }))
      .toEqual({ code: 'enucleation', name: 'Enucleation, left', side: 'left', performedBy: 'Dr A' })
    expect(upgradeEntryData('procedure', { name: 'fin trim', side: 'not_applicable', surgeon: 'Dr A' })).toMatchObject({ code: 'fin_trim' })
    expect(upgradeEntryData('procedure', { name: 'Scale repair', side: 'left', surgeon: 'Dr A' })).toMatchObject({ code: 'other' })
    expect(upgradeEntryData('procedure', { code: 'biopsy', name: '', side: 'left', performedBy: 'Dr A' })).toBeNull()
    expect(upgradeEntryData('treatment', { doseUnit: 'dose' })).toEqual({ doseUnit: 'per fish' })
    expect(upgradeEntryData('companion', { relation: 'guides' })).toEqual({ relation: 'leads' })
    expect(upgradeEntryData('companion', { relation: 'avoids' })).toBeNull()
  })
})

describe('treatments and flags', () => {
  it('counts a course of n days from its first day', () => {
    expect(treatmentLastDay({ startOn: '2026-03-30', durationDays: 5 })).toBe('2026-04-03')
    expect(treatmentLastDay({ startOn: '2026-02-27', durationDays: 3 })).toBe('2026-03-01')
    expect(treatmentLastDay({ startOn: '2026-02-27', endOn: '2026-03-10' })).toBe('2026-03-10')
    expect(treatmentLastDay({ startOn: '2026-02-27' })).toBeNull()
    expect(isCurrentTreatment({ startOn: '2026-03-30', durationDays: 5 }, '2026-04-03')).toBe(true)
    expect(isCurrentTreatment({ startOn: '2026-03-30', durationDays: 5 }, '2026-04-04')).toBe(false)
    expect(isCurrentTreatment({ startOn: '2026-03-30' }, '2030-01-01')).toBe(true)
    expect(isCurrentTreatment({ startOn: '2026-03-30' }, '2026-03-29')).toBe(false)
  })

  it('flags values outside the interval and a recovery over 30 minutes (common practice)', () => {
    expect([analyteFlag({ value: 1, low: 2 }), analyteFlag({ value: 2, low: 2, high: 3 }), analyteFlag({ value: 3.1, high: 3 })]).toEqual(['low', null, 'high'])
    expect([isProlongedRecovery(30), isProlongedRecovery(31), isProlongedRecovery(undefined)]).toEqual([false, true, false])
  })

  it('words a companion from each side, earlier relation names included', () => {
    expect(relationWords('leads', undefined, 'subject')).toBe('leads')
    expect(relationWords('leads', undefined, 'related')).toBe('follows')
    expect(relationWords('chases', undefined, 'related')).toBe('is chased by')
    expect(relationWords('guides', undefined, 'related')).toBe('follows')
    expect(relationWords('always_together', undefined, 'related')).toBe('keeps close to')
  })

  it('ends a course given as doses on the day of its last dose', () => {
    // 5 doses 48 hours apart from 1 March: the last falls 8 days later, on 9 March.
    expect(treatmentLastDay({ startOn: '2026-03-01', doseCount: 5, intervalHours: 48 })).toBe('2026-03-09')
    expect(treatmentLastDay({ startOn: '2026-03-01', doseCount: 1 })).toBe('2026-03-01')
  })

  it('needs the exposure for a dip or a hospital-tank bath, and the interval for more than one dose', () => {
    const base = { drug: 'Potassium permanganate', dose: 10, doseUnit: 'mg/L', startOn: '2026-03-01' }
    const issues = (data: object) => (treatmentData.safeParse(data).error?.issues ?? []).map(i => i.path.join('.'))
    expect(issues({ ...base, route: 'dip' })).toEqual(['exposureMinutes'])
    expect(issues({ ...base, route: 'tank_bath' })).toEqual(['exposureMinutes'])
    expect(issues({ ...base, route: 'pond_immersion' })).toEqual([])
    expect(issues({ ...base, route: 'dip', exposureMinutes: 30, doseCount: 3 })).toEqual(['intervalHours'])
    expect(issues({ ...base, route: 'pond_immersion', amountAdded: 120 })).toEqual(['amountAddedUnit'])
    expect(issues({ ...base, route: 'bath' })).toEqual(['route'])
  })
})

describe('who may write what', () => {
  it('drives the add buttons from the same table as the server check', () => {
    expect(kindsOffered('keeper').map(o => `${o.kind}${o.limited ? '*' : ''}`)).toEqual(['measurement', 'observation', 'problem*', 'treatment*', 'companion'])
    expect(kindsOffered('owner').map(o => `${o.kind}${o.limited ? '*' : ''}`)).toEqual(['measurement', 'observation', 'problem*', 'treatment*', 'companion', 'death'])
    expect(kindsOffered('vet')).toHaveLength(10)
    for (const role of ['owner', 'keeper', 'vet'] as const) {
      for (const offer of kindsOffered(role)) {
        if (!offer.limited) expect(writeDecision(role, offer.kind, {}).allowed).toBe(true)
      }
    }
    expect(writeDecision('keeper', 'problem', { status: 'suspected' }).allowed).toBe(true)
    expect(writeDecision('keeper', 'problem', { status: 'active' })).toMatchObject({ allowed: false, field: 'data.status' })
    expect(writeDecision('keeper', 'treatment', { instructedById: '  ' })).toMatchObject({ allowed: false, field: 'data.instructedById', status: 400 })
    expect(writeDecision('owner', 'treatment', { instructedById: '7d1f4a52-58a4-4f53-8f3e-8d1c2f0e9a11' }).allowed).toBe(true)
    expect(writeDecision('owner', 'treatment', { givenOnInstructionOf: 'Dr Vet' }).allowed).toBe(false)
    expect(['owner', 'keeper', 'vet'].map(role => doseDecision(role as 'vet').allowed)).toEqual([true, true, true])
    expect(writeDecision('keeper', 'death', {})).toEqual({ allowed: false, message: 'Death entries are written by an owner or vet of the pond' })
  })

  it('lets an owner amend only non-clinical entries written by others', () => {
    const owner = { userId: 'o', role: 'owner' as const }
    expect(amendDecision(owner, { authorId: 'k', kind: 'measurement', data: {} }).allowed).toBe(true)
    expect(amendDecision(owner, { authorId: 'k', kind: 'problem', data: { status: 'suspected' } }).allowed).toBe(true)
    expect(amendDecision(owner, { authorId: 'v', kind: 'problem', data: { status: 'active' } }).allowed).toBe(false)
    expect(amendDecision(owner, { authorId: 'k', kind: 'treatment', data: { instructedById: 'v' } }).allowed).toBe(true)
    expect(amendDecision(owner, { authorId: 'v', kind: 'exam', data: {} }).allowed).toBe(false)
    expect(amendDecision({ userId: 'k', role: 'keeper' }, { authorId: 'o', kind: 'observation', data: {} }).allowed).toBe(false)
  })
})

describe('entryCreateSchema', () => {
  it('reads a date-only entry as midday UTC and fills the defaults of its kind', () => {
    const parsed = entryCreateSchema.parse({ kind: 'measurement', occurredAt: '2024-05-01', data: { weightG: 850 } })
    expect(parsed).toEqual({ kind: 'measurement', occurredAt: '2024-05-01T12:00:00.000Z', data: { weightG: 850, lengthType: 'total' } })
    const withOffset = entryCreateSchema.parse({ kind: 'death', occurredAt: '2024-05-01T08:30:00+02:00', data: {} })
    expect(withOffset).toEqual({ kind: 'death', occurredAt: '2024-05-01T06:30:00.000Z', data: { cause: '', euthanased: false, necropsy: '' } })
  })

  it('keeps a procedure’s anaesthesia record to the procedure kind', () => {
    const anaesthesia = { agent: 'MS-222', concentrationMgL: 100 }
    expect(entryCreateSchema.safeParse({ kind: 'procedure', occurredAt: '2024-05-01', data: { code: 'biopsy', side: 'left', performedBy: 'A' }, anaesthesia }).success).toBe(true)
    expect(entryCreateSchema.safeParse({ kind: 'exam', occurredAt: '2024-05-01', data: { assessment: 'Fine' }, anaesthesia }).success).toBe(false)
  })
})
