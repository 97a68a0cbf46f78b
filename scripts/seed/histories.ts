// Demo life histories: up to twenty years of weighings, health checks, one parasite episode,
// one eye removal with its anaesthesia record, a guiding companion, a blood panel, a fish losing
// condition and the death of the oldest fish. Everything here is invented; clinical values and
// reference intervals are made up for the demo and are no guide to treatment.
import { randomUUID } from 'node:crypto'
import { eq } from 'drizzle-orm'
import type { NodePgDatabase } from 'drizzle-orm/node-postgres'
import * as schema from '../../server/db/schema'
import { formatLength, formatMass } from '../../shared/utils/units'
import type { EntryKind } from '../../shared/utils/timeline-schemas'
import { decimalYear, hatchDate, lengthAt, round, seasonFactor, seededRandom, weightAt, type GrowthModel } from './growth'

export interface SeedContext {
  people: Record<string, string>
  ponds: { garden: string, courtyard: string, whitlock: string }
  fish: Record<string, string>
}

export type SeedTx = Parameters<Parameters<NodePgDatabase<typeof schema>['transaction']>[0]>[0]
type Person = 'owner' | 'family' | 'keeper' | 'vet' | 'otherClient'
type Data = Record<string, unknown>

interface Planned {
  id: string
  fish: string
  kind: EntryKind
  at: Date
  by: Person
  data: Data
  related?: string
  amendments: { data: Data, by: Person, reason: string, at: Date }[]
  error?: { by: Person, reason: string, at: Date }
}

const VET_NAME = 'Dr Ada Okafor'
const NOW = new Date('2026-12-01T09:00:00Z')
const at = (day: string, time = '10:00') => new Date(`${day}T${time}:00Z`)
const dayOf = (date: Date) => date.toISOString().slice(0, 10)

type PondKey = 'garden' | 'courtyard' | 'whitlock'

interface DemoFishGrowth extends GrowthModel {
  hatchYear: number
  pond: PondKey
  firstRecord: string
  /** Young koi are grown on in the small Courtyard pond and moved to the Garden pond at about 40 cm. */
  movedTo?: { pond: PondKey, on: string }
}

// Koi: L∞ 70–80 cm with K about 0.3 (see growth.ts), Fulton's K 1.5–1.9 by total length.
const KOI = { referenceLengthCm: 50, lengthType: 'total' } as const
// Fancy goldfish (ryukin, oranda) are measured without the tail (standard length) and are nearly as
// deep as half that length and a third as wide: as an ellipsoid that is K(SL) of about 10–13, so we
// use 10–11 (our own estimate from common-practice body proportions, not a published figure). Slender
// comets and shubunkins, by total length, have K about 1.3 (common practice).
const FANCY_GOLDFISH = { referenceLengthCm: 10, lengthType: 'standard' } as const
const SINGLE_TAIL_GOLDFISH = { referenceLengthCm: 15, lengthType: 'total' } as const
export const GROWTH: Record<string, DemoFishGrowth> = {
  Hoshi: { ...KOI, pond: 'garden', hatchYear: 2004, firstRecord: '2007-05-19', maxLengthCm: 78, rate: 0.3, condition: 1.75 },
  Bento: { ...KOI, pond: 'garden', hatchYear: 2012, firstRecord: '2013-06-02', maxLengthCm: 72, rate: 0.3, condition: 1.68 },
  Clementine: { ...KOI, pond: 'garden', hatchYear: 2009, firstRecord: '2011-08-14', maxLengthCm: 84, rate: 0.29, condition: 1.9 },
  Juniper: { ...KOI, pond: 'garden', hatchYear: 2016, firstRecord: '2017-04-30', maxLengthCm: 74, rate: 0.31, condition: 1.7 },
  Pilot: { ...KOI, pond: 'garden', hatchYear: 2003, firstRecord: '2010-09-01', maxLengthCm: 70, rate: 0.28, condition: 1.52 },
  Marble: { ...KOI, pond: 'garden', hatchYear: 2019, firstRecord: '2020-05-10', maxLengthCm: 70, rate: 0.3, condition: 1.6 },
  Saffron: { ...KOI, pond: 'garden', hatchYear: 2014, firstRecord: '2015-06-20', maxLengthCm: 76, rate: 0.3, condition: 1.72 },
  Tancho: { ...KOI, pond: 'garden', hatchYear: 2018, firstRecord: '2019-07-07', maxLengthCm: 72, rate: 0.31, condition: 1.6 },
  Nori: { ...KOI, pond: 'garden', hatchYear: 2001, firstRecord: '2006-03-15', maxLengthCm: 80, rate: 0.27, condition: 1.7 },
  // Hatched in the pond in June 2024 and first netted in September, at about 6 cm.
  Pebble: { ...KOI, pond: 'garden', hatchYear: 2024, firstRecord: '2024-09-20', maxLengthCm: 72, rate: 0.3, condition: 1.55 },
  Button: { ...FANCY_GOLDFISH, pond: 'courtyard', hatchYear: 2020, firstRecord: '2021-04-11', maxLengthCm: 12, rate: 0.75, condition: 11 },
  Mochi: { ...FANCY_GOLDFISH, pond: 'courtyard', hatchYear: 2017, firstRecord: '2018-05-05', maxLengthCm: 13, rate: 0.7, condition: 10 },
  Comet: { ...SINGLE_TAIL_GOLDFISH, pond: 'courtyard', hatchYear: 2022, firstRecord: '2022-07-02', maxLengthCm: 26, rate: 0.55, condition: 1.3 },
  Sunny: { ...SINGLE_TAIL_GOLDFISH, pond: 'courtyard', hatchYear: 2015, firstRecord: '2016-06-18', maxLengthCm: 24, rate: 0.55, condition: 1.35 },
  Yuzu: { ...KOI, pond: 'courtyard', hatchYear: 2021, firstRecord: '2022-05-21', maxLengthCm: 70, rate: 0.32, condition: 1.6, movedTo: { pond: 'garden', on: '2024-05-18' } },
  Kenzo: { ...KOI, pond: 'courtyard', hatchYear: 2023, firstRecord: '2024-04-27', maxLengthCm: 70, rate: 0.32, condition: 1.55, movedTo: { pond: 'garden', on: '2026-05-16' } },
  Duchess: { ...KOI, pond: 'whitlock', hatchYear: 2011, firstRecord: '2012-05-12', maxLengthCm: 80, rate: 0.3, condition: 1.75 },
  Rusty: { ...KOI, pond: 'whitlock', hatchYear: 2015, firstRecord: '2016-05-14', maxLengthCm: 82, rate: 0.3, condition: 1.7 },
  Ghost: { ...KOI, pond: 'whitlock', hatchYear: 2018, firstRecord: '2019-06-01', maxLengthCm: 74, rate: 0.3, condition: 1.55 },
}

/** The pond a fish lived in on a given day. */
function pondAt(name: string, date: Date): PondKey {
  const g = GROWTH[name]!
  return g.movedTo && date >= at(g.movedTo.on, '00:00') ? g.movedTo.pond : g.pond
}

// Body condition over a life where the story needs it: thin when rescued, a slump after surgery,
// a decline before death, and a fish losing weight this autumn.
function storyCondition(name: string, date: Date): number {
  const y = date.getUTCFullYear() + date.getUTCMonth() / 12
  if (name === 'Pilot' && y < 2012) return 0.8 + (y - 2010.6) * 0.12
  if (name === 'Pilot' && y >= 2019.35 && y < 2019.9) return 0.9
  if (name === 'Nori' && y >= 2024.9) return Math.max(0.72, 1 - (y - 2024.9) * 0.3)
  if (name === 'Saffron' && y >= 2026.5) return SAFFRON_2026[dayOf(date)] ?? 1
  return 1
}

// Her autumn: a normal August, then more than 10 % gone within 90 days (the weight-loss flag).
const SAFFRON_2026: Record<string, number> = { '2026-08-20': 0.98, '2026-10-05': 0.88, '2026-11-20': 0.76 }
const NORI_DIED = '2025-11-03'

function measurementAuthor(pond: PondKey, date: Date, autumn: boolean): Person {
  if (pond === 'whitlock') return 'otherClient'
  if (pond === 'courtyard') return date.getUTCFullYear() >= 2019 ? 'family' : 'owner'
  if (date.getUTCFullYear() < 2019) return 'owner'
  return autumn && date.getUTCFullYear() >= 2020 ? 'family' : 'keeper'
}

export async function seedHistories(tx: SeedTx, context: SeedContext) {
  const random = seededRandom(20260501)
  const plan: Planned[] = []
  const add = (fish: string, kind: EntryKind, when: Date, by: Person, data: Data, extra: Partial<Planned> = {}) => {
    const entry: Planned = { id: randomUUID(), fish, kind, at: when, by, data, amendments: [], ...extra }
    plan.push(entry)
    return entry
  }
  const jitter = (days: number) => Math.round((random() - 0.5) * 2 * days)
  const shift = (day: string, days: number, time = '10:00') => {
    const date = at(day, time)
    date.setUTCDate(date.getUTCDate() + days)
    return date
  }

  // ---- weighings: spring and autumn, every year since the fish arrived ----
  for (const [name, g] of Object.entries(GROWTH)) {
    const first = at(g.firstRecord)
    const lastYear = name === 'Nori' ? 2025 : 2026
    let previousLength = 0
    for (let year = first.getUTCFullYear(); year <= lastYear; year++) {
      const dates = [shift(`${year}-04-22`, jitter(8)), shift(`${year}-10-04`, jitter(8))]
      if (name === 'Saffron' && year === 2026) dates.splice(1, 1, ...Object.keys(SAFFRON_2026).map(d => at(d)))
      for (const date of dates) {
        if (date < first || date > NOW || (name === 'Nori' && date >= at(NORI_DIED))) continue
        const length = Math.max(previousLength, lengthAt(g, hatchDate(g.hatchYear), decimalYear(date)) * (1 + (random() - 0.5) * 0.012))
        previousLength = length
        const weight = weightAt(g, length, seasonFactor(date.getUTCMonth() + 1) * storyCondition(name, date) * (1 + (random() - 0.5) * 0.05))
        const by = measurementAuthor(pondAt(name, date), date, date.getUTCMonth() >= 7)
        add(name, 'measurement', date, by, measured(by, weight, length, g))
      }
    }
  }

  // ---- yearly spring health checks by the vet ----
  const examStart = { garden: 2012, courtyard: 2018, whitlock: 2012 }
  for (const [name, g] of Object.entries(GROWTH)) {
    for (let year = Math.max(examStart[g.pond], at(g.firstRecord).getUTCFullYear() + 1); year <= 2026; year++) {
      if (name === 'Nori' && year > 2025) break
      const date = shift(`${year}-04-24`, jitter(4), '11:30')
      const eyes = name === 'Pilot' && year >= 2020 ? { state: 'abnormal', note: 'Left eye absent (enucleated 2019); socket healed and clean' } : { state: 'normal', note: '' }
      add(name, 'exam', date, 'vet', {
        reason: 'Spring health check',
        history: pick(random, ['Eating well since the water warmed', 'No concerns from the keeper', 'Came through the winter well', 'Active at feeding; no flashing seen']),
        findings: [
          { system: 'general', state: 'normal', note: '' },
          { system: 'skin', state: 'normal', note: '' },
          { system: 'fins', state: 'normal', note: '' },
          { system: 'gills', state: 'normal', note: '' },
          { system: 'eyes', ...eyes },
          { system: 'buoyancy', state: 'normal', note: '' },
        ],
        assessment: name === 'Nori' && year >= 2024 ? 'Old fish in fair condition; slower at feeding than last year' : 'Healthy',
        plan: 'Recheck next spring',
      })
    }
  }

  // ---- a summer observation every other year, from the keeper ----
  for (const [name, g] of Object.entries(GROWTH)) {
    for (let year = Math.max(2019, at(g.firstRecord).getUTCFullYear()); year <= 2026; year += 2) {
      if (name === 'Nori' && year > 2025) break
      const when = shift(`${year}-07-12`, jitter(10), '18:00')
      const pond = pondAt(name, when)
      const by: Person = pond === 'whitlock' ? 'otherClient' : pond === 'courtyard' ? 'family' : 'keeper'
      add(name, 'observation', when, by, {
        signs: ['eating_well'],
        text: pick(random, ['Up at the surface for every feed', 'Colour good, swimming with the group', 'Took food from the hand', 'Calm; fins open']),
      })
    }
  }

  // ---- Pilot: a mass behind the left eye, enucleation in 2019, and Clementine as a guide ----
  add('Pilot', 'observation', at('2019-05-14', '08:15'), 'keeper', { signs: ['cloudy_eye', 'lump', 'hiding'], text: 'Left eye bulging and cloudy; staying under the ledge' })
  add('Pilot', 'exam', at('2019-05-16', '14:00'), 'vet', {
    reason: 'Sick call: bulging left eye',
    history: 'Left eye bulging for about a week; eating less',
    findings: [
      { system: 'eyes', state: 'abnormal', note: 'Left globe pushed forward by a firm mass behind it; cornea cloudy. Right eye normal' },
      { system: 'gills', state: 'normal', note: '' },
      { system: 'skin', state: 'normal', note: '' },
    ],
    assessment: 'Retrobulbar mass, left eye; a tumour is likely',
    plan: 'Remove the left eye with the mass under anaesthesia next week; send the mass for histopathology',
  })
  const eyeProblem = add('Pilot', 'problem', at('2019-05-16', '14:10'), 'vet', { name: 'Retrobulbar mass, left eye', onset: '2019-05-08', status: 'active', notes: '' })
  eyeProblem.amendments.push({ by: 'vet', at: at('2019-07-02', '12:00'), reason: 'Healed; no regrowth at the recheck', data: { name: 'Retrobulbar mass, left eye', onset: '2019-05-08', status: 'resolved', resolvedOn: '2019-07-02', notes: 'Removed with the eye on 2019-05-23' } })
  const pilotAnaesthesia = add('Pilot', 'anaesthesia', at('2019-05-23', '10:05'), 'vet', {
    agent: 'MS-222 (tricaine methanesulfonate)', concentrationMgL: 120, buffer: 'Sodium bicarbonate, twice the MS-222 by weight',
    waterTemperatureC: 17, inductionMinutes: 4, recoveryMinutes: 18,
    monitoring: 'Gill movements slow and regular throughout; pond water over the gills during surgery',
  })
  add('Pilot', 'procedure', at('2019-05-23', '10:30'), 'vet', {
    code: 'enucleation', name: 'Left eye removed with the retrobulbar mass', bodySite: 'left eye', side: 'left', performedBy: VET_NAME,
    notes: 'Globe and retrobulbar mass removed together; haemostasis with pressure', outcome: 'Socket closed with absorbable sutures; upright and swimming at 18 minutes',
    recheckOn: '2019-06-06', anaesthesiaEntryId: pilotAnaesthesia.id,
  })
  add('Pilot', 'treatment', at('2019-05-23', '10:50'), 'vet', {
    drug: 'Enrofloxacin', route: 'injection', injectionSite: 'Intramuscular, below the dorsal fin', dose: 10, doseUnit: 'mg/kg',
    startOn: '2019-05-23', durationDays: 10, givenBy: VET_NAME, notes: 'Every other day, five injections',
  })
  add('Pilot', 'lab_result', at('2019-06-04', '16:00'), 'vet', {
    panel: 'other', panelName: 'Histopathology', laboratory: 'Exampleton Veterinary Laboratory', sample: 'Left globe and retrobulbar mass',
    findings: 'Spindle-cell tumour behind the globe, removed with clear margins',
  })
  add('Pilot', 'exam', at('2019-06-06', '11:00'), 'vet', {
    reason: 'Recheck after enucleation', history: 'Eating again since day 4',
    findings: [{ system: 'eyes', state: 'abnormal', note: 'Left socket closed, sutures dissolving, no swelling' }],
    assessment: 'Healing well', plan: 'No further visits needed for the eye',
  })
  add('Clementine', 'companion', at('2019-07-10', '18:30'), 'keeper', { relatedFishId: 'Pilot', relation: 'leads', note: 'Since the eye came out Pilot swims just behind Clementine’s left side and follows her to the food' }, { related: 'Pilot' })
  add('Pilot', 'observation', at('2019-07-10', '18:35'), 'keeper', { signs: ['eating_well'], text: 'Finds the food by following Clementine' })
  add('Hoshi', 'companion', at('2012-06-02', '17:00'), 'owner', { relatedFishId: 'Nori', relation: 'stays_close', note: 'Always side by side since Hoshi arrived' }, { related: 'Nori' })

  // ---- Garden pond, spring 2022: Ichthyobodo, treated with a salt bath ----
  for (const name of ['Bento', 'Juniper', 'Tancho']) {
    add(name, 'observation', at('2022-04-08', '07:45'), 'keeper', { signs: ['flashing', 'clamped_fins', 'excess_mucus'], text: 'Flashing on the bottom drain and hanging near the waterfall' })
  }
  add('Juniper', 'problem', at('2022-04-08', '08:00'), 'keeper', { name: 'Skin parasites', onset: '2022-04-06', status: 'suspected', notes: 'Flashing in three fish' })
  add('Bento', 'exam', at('2022-04-10', '11:00'), 'vet', {
    reason: 'Sick call: flashing in three fish', history: 'Flashing and clamped fins for four days; water tests normal',
    findings: [
      { system: 'skin', state: 'abnormal', note: 'Grey mucus film over the back' },
      { system: 'gills', state: 'abnormal', note: 'Slightly pale, excess mucus' },
      { system: 'fins', state: 'abnormal', note: 'Clamped dorsal fin' },
    ],
    assessment: 'Ichthyobodo on the skin scrape; a few gill flukes',
    plan: 'Salt bath for the whole pond for 14 days; repeat the scrape at the end',
  })
  add('Bento', 'lab_result', at('2022-04-10', '11:20'), 'vet', {
    panel: 'skin_scrape', sample: 'Scrape from behind the dorsal fin, wet mount at 100× and 400×',
    organisms: [{ name: 'Ichthyobodo (Costia)', count: 'Many: 10 or more per field at 400×' }],
    findings: 'No Trichodina or white spot seen',
  })
  add('Bento', 'lab_result', at('2022-04-10', '11:30'), 'vet', {
    panel: 'gill_biopsy', sample: 'Gill clip, left side, wet mount',
    organisms: [{ name: 'Dactylogyrus (gill fluke)', count: 'Few: 2 in the clip' }],
    findings: 'Mild mucus excess',
  })
  const parasites = add('Bento', 'problem', at('2022-04-10', '11:40'), 'vet', { name: 'Ichthyobodo infestation', onset: '2022-04-06', status: 'active', notes: 'Juniper and Tancho flashing too' })
  parasites.amendments.push({ by: 'vet', at: at('2022-04-26', '12:00'), reason: 'Scrape clear after the salt bath', data: { name: 'Ichthyobodo infestation', onset: '2022-04-06', status: 'resolved', resolvedOn: '2022-04-26', notes: 'Juniper and Tancho flashing too' } })
  const salt = { drug: 'Salt (sodium chloride), whole-pond bath', route: 'pond_immersion', dose: 3, doseUnit: 'g/L', startOn: '2022-04-10', durationDays: 14, notes: 'Pond at 0.3 %; added in three steps over two days' }
  add('Bento', 'treatment', at('2022-04-10', '12:00'), 'vet', { ...salt, givenBy: VET_NAME })
  for (const name of ['Juniper', 'Tancho']) add(name, 'treatment', at('2022-04-10', '17:00'), 'keeper', { ...salt, givenBy: 'Priya Anand', instructedBy: VET_NAME })
  add('Bento', 'lab_result', at('2022-04-26', '11:00'), 'vet', { panel: 'skin_scrape', sample: 'Repeat scrape', findings: 'No Ichthyobodo seen in three fields' })

  // ---- Tancho gets a microchip; Mochi's wen is trimmed and he is slow to wake ----
  const chipAnaesthesia = add('Tancho', 'anaesthesia', at('2019-08-10', '10:00'), 'vet', { agent: 'MS-222 (tricaine methanesulfonate)', concentrationMgL: 80, buffer: 'Sodium bicarbonate', waterTemperatureC: 21, inductionMinutes: 3, recoveryMinutes: 6, monitoring: 'Light sedation only' })
  add('Tancho', 'procedure', at('2019-08-10', '10:10'), 'vet', { code: 'microchip_implant', name: 'Microchip implant', bodySite: 'dorsal musculature below the dorsal fin', side: 'left', performedBy: VET_NAME, outcome: 'Chip reads 999000024681363', anaesthesiaEntryId: chipAnaesthesia.id })
  const wenAnaesthesia = add('Mochi', 'anaesthesia', at('2023-06-14', '09:40'), 'vet', {
    agent: 'MS-222 (tricaine methanesulfonate)', concentrationMgL: 90, buffer: 'Sodium bicarbonate', waterTemperatureC: 22, inductionMinutes: 5, recoveryMinutes: 34,
    monitoring: 'Slow to right himself; kept in a floating basket with an air stone until swimming',
  })
  add('Mochi', 'procedure', at('2023-06-14', '10:00'), 'vet', { code: 'wen_trim', name: 'Wen trim', bodySite: 'wen over both eyes', side: 'both', performedBy: VET_NAME, outcome: 'Wen trimmed clear of both eyes; slow recovery, normal by evening', recheckOn: '2023-06-28', anaesthesiaEntryId: wenAnaesthesia.id })
  add('Sunny', 'observation', at('2020-05-30', '09:00'), 'family', { signs: ['white_spots', 'flashing'], text: 'A few white spots on the tail' })
  add('Rusty', 'lab_result', at('2024-04-23', '12:00'), 'vet', { panel: 'gill_biopsy', sample: 'Gill clip at the spring check', organisms: [{ name: 'Dactylogyrus (gill fluke)', count: 'Occasional: 1 in the clip' }], findings: 'Within what a healthy pond shows; no treatment' })

  // ---- Saffron is losing condition this autumn ----
  add('Saffron', 'observation', at('2026-10-04', '17:30'), 'keeper', { signs: ['poor_appetite', 'hiding'], text: 'Leaves the food to the others; under the ledge most of the day' })
  add('Saffron', 'problem', at('2026-10-05', '10:30'), 'keeper', { name: 'Losing weight', onset: '2026-08-20', status: 'suspected' })
  add('Saffron', 'observation', at('2026-11-15', '16:00'), 'family', { signs: ['thin', 'lethargic'], text: 'Back looks narrow from above' })
  add('Saffron', 'exam', at('2026-11-20', '11:00'), 'vet', {
    reason: 'Sick call: weight loss', history: 'Eating less since August; about 20 % lighter than in the spring',
    findings: [
      { system: 'general', state: 'abnormal', note: 'Thin dorsal musculature; slow to move away' },
      { system: 'gills', state: 'abnormal', note: 'Pale' },
      { system: 'skin', state: 'normal', note: '' },
      { system: 'coelom', state: 'normal', note: 'No swelling' },
    ],
    assessment: 'Progressive weight loss with pale gills; chronic bacterial infection, internal parasites or a tumour possible',
    plan: 'Blood panel today; antibiotic course while waiting; recheck in four weeks',
  })
  add('Saffron', 'problem', at('2026-11-20', '11:20'), 'vet', { name: 'Weight loss, cause not yet known', onset: '2026-08-20', status: 'active' })
  const invented = 'Intervals as printed on the laboratory report (invented for the demo, not clinical references)'
  add('Saffron', 'lab_result', at('2026-11-20', '11:30'), 'vet', {
    panel: 'haematology', laboratory: 'Exampleton Veterinary Laboratory', sample: 'Caudal vein, lithium heparin', intervalSource: invented,
    analytes: [
      { name: 'Packed cell volume', value: 19, unit: '%', low: 25, high: 45 },
      { name: 'Haemoglobin', value: 5.8, unit: 'g/dL', low: 6.5, high: 11 },
      { name: 'White cell count', value: 58, unit: '×10⁹/L', low: 20, high: 50 },
      { name: 'Thrombocytes', value: 41, unit: '×10⁹/L', low: 30, high: 80 },
    ],
  })
  add('Saffron', 'lab_result', at('2026-11-20', '11:40'), 'vet', {
    panel: 'biochemistry', laboratory: 'Exampleton Veterinary Laboratory', sample: 'Caudal vein, lithium heparin', intervalSource: invented,
    analytes: [
      { name: 'Total protein', value: 2.2, unit: 'g/dL', low: 2.6, high: 4.4 },
      { name: 'Albumin', value: 0.8, unit: 'g/dL', low: 0.9, high: 1.7 },
      { name: 'Glucose', value: 62, unit: 'mg/dL', low: 40, high: 110 },
      { name: 'Aspartate aminotransferase', value: 210, unit: 'U/L', low: 40, high: 160 },
      { name: 'Sodium', value: 136, unit: 'mmol/L', low: 130, high: 148 },
    ],
  })
  add('Saffron', 'treatment', at('2026-11-21', '10:00'), 'vet', {
    drug: 'Enrofloxacin', route: 'injection', injectionSite: 'Intramuscular, below the dorsal fin', dose: 10, doseUnit: 'mg/kg',
    startOn: '2026-11-21', durationDays: 14, givenBy: VET_NAME, notes: 'Every other day; keeper to watch appetite',
  })

  // ---- Nori, the oldest, declines through 2025 and dies in November ----
  add('Nori', 'observation', at('2025-06-18', '18:00'), 'keeper', { signs: ['lethargic', 'sitting_on_bottom'], text: 'Resting on the bottom more; still comes up to eat' })
  add('Nori', 'exam', at('2025-09-02', '11:00'), 'vet', {
    reason: 'Sick call: slowing down', history: 'Less active since June; eating less',
    findings: [{ system: 'general', state: 'abnormal', note: 'Thin; slow; about 25 years old' }, { system: 'gills', state: 'normal', note: '' }],
    assessment: 'Old-age decline; no sign of infection', plan: 'Keep comfortable; shade and quiet; no treatment',
  })
  add('Nori', 'death', at(NORI_DIED, '08:00'), 'owner', { cause: 'Old age: a slow decline over the summer', euthanased: false, necropsy: 'Not performed, at the owner’s wish' })

  // ---- the record corrects itself: an amended weighing, a weighing on the wrong fish ----
  const tomsWeighing = plan.find(e => e.fish === 'Comet' && e.kind === 'measurement' && e.by === 'family' && e.at.getUTCFullYear() === 2024)
  if (tomsWeighing) {
    const typed = { ...tomsWeighing.data }
    tomsWeighing.amendments.push({ by: 'family', at: new Date(tomsWeighing.at.getTime() + 3_600_000), reason: 'Left the net on the scale', data: typed })
    const withNet = Math.round(Number(typed.weightG) * 1.22)
    tomsWeighing.data = { ...typed, weightG: withNet, entered: { ...(typed.entered as Data), weight: formatMass(withNet, 'us') } }
  }
  // Juniper (Sanke) and Bento (Showa) are both red, white and black and within a few centimetres of
  // each other: her spring weighing went on his record first, and was entered again on hers.
  const juniperSpring = plan.find(e => e.fish === 'Juniper' && e.kind === 'measurement' && dayOf(e.at).startsWith('2025-04'))
  if (juniperSpring) {
    add('Bento', 'measurement', new Date(juniperSpring.at.getTime() - 600_000), juniperSpring.by, { ...juniperSpring.data }, {
      error: { by: juniperSpring.by, at: new Date(juniperSpring.at.getTime() + 300_000), reason: 'This was Juniper in the net, not Bento: the same size and both red, white and black. Entered again on Juniper.' },
    })
  }

  await write(tx, context, plan)
  await writeMoves(tx, context)
  await tx.update(schema.fish).set({ status: 'deceased', version: 2 }).where(eq(schema.fish.id, context.fish.Nori!))
  await tx.insert(schema.fishEdits).values({ fishId: context.fish.Nori!, userId: context.people.owner!, changes: [{ field: 'status', from: 'alive', to: 'deceased' }], createdAt: at(NORI_DIED, '08:01') })
}

function pick<T>(random: () => number, list: readonly T[]): T {
  return list[Math.floor(random() * list.length)]!
}

// Metric people weigh to 10 g (koi) or 1 g (goldfish) and measure to half a centimetre; the US
// household member reads pounds, ounces and inches, which are stored converted, as typed.
function measured(by: Person, weight: number, length: number, g: DemoFishGrowth): Data {
  const small = g.maxLengthCm < 30
  if (by === 'family') {
    const ounces = round(weight / 28.349523125, 0.1)
    const inches = round(length / 2.54, 0.1)
    const weightG = Number((ounces * 28.349523125).toFixed(3))
    const lengthCm = Number((inches * 2.54).toFixed(3))
    return { weightG, lengthCm, lengthType: g.lengthType, entered: { weight: formatMass(weightG, 'us'), length: formatLength(lengthCm, 'us') } }
  }
  // Scales read to 1 g below 100 g (fry, goldfish), to 10 g above.
  return { weightG: round(weight, small || weight < 100 ? 1 : 10), lengthCm: round(length, 0.5), lengthType: g.lengthType }
}

async function write(tx: SeedTx, context: SeedContext, plan: Planned[]) {
  const person = (key: Person) => context.people[key]!
  // The demo vet performs and prescribes by account, as the forms record it.
  const withPeople = (data: Data): Data => ({
    ...data,
    ...(data.performedBy === VET_NAME ? { performedById: person('vet') } : {}),
    ...(data.instructedBy === VET_NAME ? { instructedById: person('vet') } : {}),
  })
  const rows = plan.map((e) => {
    // `data` is the entry as first written; amendments follow in order below.
    const data = withPeople(e.kind === 'companion' ? { ...e.data, relatedFishId: context.fish[e.related!] } : e.data)
    return {
      id: e.id, fishId: context.fish[e.fish]!, pondId: context.ponds[pondAt(e.fish, e.at)], kind: e.kind, occurredAt: e.at, authorId: person(e.by), data,
      relatedFishId: e.related ? context.fish[e.related]! : null,
      linkedEntryId: typeof e.data.anaesthesiaEntryId === 'string' ? e.data.anaesthesiaEntryId : null,
      createdAt: e.at, updatedAt: e.at,
    }
  })
  for (let i = 0; i < rows.length; i += 500) {
    const chunk = rows.slice(i, i + 500)
    await tx.insert(schema.timelineEntries).values(chunk)
    await tx.insert(schema.timelineRevisions).values(chunk.map(r => ({ entryId: r.id, revision: 1, occurredAt: r.occurredAt, data: r.data, authorId: r.authorId, createdAt: r.createdAt })))
  }
  for (const e of plan) {
    let revision = 1
    for (const amendment of e.amendments) {
      revision++
      await tx.insert(schema.timelineRevisions).values({ entryId: e.id, revision, occurredAt: e.at, data: amendment.data, authorId: person(amendment.by), reason: amendment.reason, createdAt: amendment.at })
      await tx.update(schema.timelineEntries).set({ data: amendment.data, revision, updatedAt: amendment.at }).where(eq(schema.timelineEntries.id, e.id))
    }
    if (e.error) {
      await tx.update(schema.timelineEntries)
        .set({ enteredInError: true, errorReason: e.error.reason, errorById: person(e.error.by), errorAt: e.error.at, updatedAt: e.error.at })
        .where(eq(schema.timelineEntries.id, e.id))
    }
  }
}

/**
 * Young koi that outgrew the Courtyard pond, moved the way the app moves a fish
 * (server/utils/fish-moves.ts): the fish's pond, an edit, a move entry with its first revision,
 * and the audit rows of both ponds. That code needs a request, so the seed writes the same rows.
 */
async function writeMoves(tx: SeedTx, context: SeedContext) {
  const pondNames: Record<PondKey, string> = { garden: 'Garden pond', courtyard: 'Courtyard pond', whitlock: 'Whitlock koi pond' }
  const actorId = context.people.owner!
  for (const [name, g] of Object.entries(GROWTH)) {
    if (!g.movedTo) continue
    const fishId = context.fish[name]!
    const from = { id: context.ponds[g.pond], name: pondNames[g.pond] }
    const to = { id: context.ponds[g.movedTo.pond], name: pondNames[g.movedTo.pond] }
    const when = at(g.movedTo.on, '11:00')
    await tx.update(schema.fish).set({ pondId: to.id, version: 2, updatedAt: when }).where(eq(schema.fish.id, fishId))
    await tx.insert(schema.fishEdits).values({ fishId, userId: actorId, changes: [{ field: 'pond', from: from.name, to: to.name }], createdAt: when })
    const [entry] = await tx.insert(schema.timelineEntries).values({ fishId, pondId: from.id, kind: 'move', occurredAt: when, authorId: actorId, data: { fromPond: from, toPond: to }, createdAt: when, updatedAt: when }).returning()
    await tx.insert(schema.timelineRevisions).values({ entryId: entry!.id, revision: 1, occurredAt: when, data: entry!.data, authorId: actorId, createdAt: when })
    const details = { fishId, fishName: name, fromPondId: from.id, fromPondName: from.name, toPondId: to.id, toPondName: to.name, separatedFrom: [] }
    await tx.insert(schema.auditEvents).values([
      { pondId: from.id, actorId, action: 'fish.moved_out', details, createdAt: when },
      { pondId: to.id, actorId, action: 'fish.moved_in', details, createdAt: when },
    ])
  }
}
