// What each entry form holds while it is being typed (text, in the person's own units), and how
// it becomes the stored entry (numbers, metric) and back again for an amendment.
import type { UnitSystem } from '#shared/types'
import { BODY_SYSTEMS, TIMED_ROUTES, TREATMENT_ROUTES, isTricaine, type EntryKind, type TreatmentRoute } from '#shared/utils/timeline-schemas'
import { convert, formatLength, formatMass } from '#shared/utils/units'
import { formatDecimal, typedDecimal, type DecimalMark } from '#shared/utils/decimal'

type Data = Record<string, unknown>

/**
 * A typed number read with the person's decimal mark (shared `parseDecimal`): "1,250" is 1250 for a
 * point reader; an empty field is nothing; text the parser refuses is NaN, which the schema refuses too.
 */
export function typedNumber(text: string, decimalMark: DecimalMark): number | undefined {
  return typedDecimal(text, decimalMark)
}

const textOrUndefined = (text: string) => (text.trim() === '' ? undefined : text.trim())
const shown = (value: unknown) => (value === undefined || value === null ? '' : String(value))
// A stored number back into a field, written the way the person writes numbers so it reads back the same.
const tidy = (value: number, digits: number, mark: DecimalMark) => formatDecimal(Number(value.toFixed(digits)), mark, digits)
const numberShown = (value: unknown, mark: DecimalMark) => (typeof value === 'number' ? formatDecimal(value, mark, 10) : shown(value))

export function todayLocal() {
  const now = new Date()
  return `${now.getFullYear()}-${String(now.getMonth() + 1).padStart(2, '0')}-${String(now.getDate()).padStart(2, '0')}`
}

export function nowLocalTime() {
  const now = new Date()
  return `${String(now.getHours()).padStart(2, '0')}:${String(now.getMinutes()).padStart(2, '0')}`
}

/** The moment the person picked, in their own time zone, as the server stores it. */
export function occurredAtFrom(day: string, time: string) {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(day)) return day
  const moment = new Date(`${day}T${/^\d{2}:\d{2}$/.test(time) ? time : '12:00'}`)
  return Number.isNaN(moment.getTime()) ? day : moment.toISOString()
}

// ---- measurement ------------------------------------------------------------------------------

export interface MeasurementForm { weight: string, weightUnit: 'g' | 'kg', pounds: string, ounces: string, length: string, lengthType: string, note: string }

function measurementBlank(): MeasurementForm {
  return { weight: '', weightUnit: 'g', pounds: '', ounces: '', length: '', lengthType: 'total', note: '' }
}

function measurementData(form: MeasurementForm, units: UnitSystem, mark: DecimalMark): Data {
  let weightG: number | undefined
  let weightText: string | undefined
  if (units === 'us') {
    const pounds = typedNumber(form.pounds, mark)
    const ounces = typedNumber(form.ounces, mark)
    if (pounds !== undefined || ounces !== undefined) {
      weightG = Number.isNaN(pounds) || Number.isNaN(ounces) ? Number.NaN : convert(pounds ?? 0, 'lb', 'g') + convert(ounces ?? 0, 'oz', 'g')
      weightText = [pounds !== undefined ? `${form.pounds.trim()} lb` : '', ounces !== undefined ? `${form.ounces.trim()} oz` : ''].filter(Boolean).join(' ')
    }
  }
  else {
    const weight = typedNumber(form.weight, mark)
    if (weight !== undefined) {
      weightG = Number.isNaN(weight) ? weight : convert(weight, form.weightUnit, 'g')
      weightText = `${form.weight.trim()} ${form.weightUnit}`
    }
  }
  const length = typedNumber(form.length, mark)
  const lengthCm = length === undefined || Number.isNaN(length) ? length : convert(length, units === 'us' ? 'in' : 'cm', 'cm')
  const entered = units === 'us' || form.weightUnit === 'kg'
    ? { weight: weightText, length: length !== undefined ? `${form.length.trim()} ${units === 'us' ? 'in' : 'cm'}` : undefined }
    : undefined
  return {
    weightG: weightG === undefined || Number.isNaN(weightG) ? weightG : Number(weightG.toFixed(3)),
    lengthCm: lengthCm === undefined || Number.isNaN(lengthCm) ? lengthCm : Number(lengthCm.toFixed(3)),
    lengthType: form.lengthType,
    entered: entered && (entered.weight || entered.length) ? entered : undefined,
    note: textOrUndefined(form.note),
  }
}

function measurementForm(data: Data, units: UnitSystem, mark: DecimalMark): MeasurementForm {
  const form = measurementBlank()
  const weightG = data.weightG as number | undefined
  const lengthCm = data.lengthCm as number | undefined
  if (weightG !== undefined) {
    if (units === 'us') {
      const totalOunces = convert(weightG, 'g', 'oz')
      const pounds = Math.floor(totalOunces / 16)
      form.pounds = pounds ? String(pounds) : ''
      form.ounces = tidy(totalOunces - pounds * 16, 1, mark)
    }
    else if (weightG >= 1000) {
      form.weight = tidy(weightG / 1000, 3, mark)
      form.weightUnit = 'kg'
    }
    else form.weight = tidy(weightG, 1, mark)
  }
  if (lengthCm !== undefined) form.length = units === 'us' ? tidy(convert(lengthCm, 'cm', 'in'), 2, mark) : tidy(lengthCm, 1, mark)
  form.lengthType = String(data.lengthType ?? 'total')
  form.note = shown(data.note)
  return form
}

/** What the person typed, in their units, for the line under the fields. */
export function measurementPreview(form: MeasurementForm, units: UnitSystem, mark: DecimalMark) {
  const data = measurementData(form, units, mark)
  const parts = [
    typeof data.weightG === 'number' && !Number.isNaN(data.weightG) ? formatMass(data.weightG, units === 'us' ? 'metric' : 'us', mark) : '',
    typeof data.lengthCm === 'number' && !Number.isNaN(data.lengthCm) ? formatLength(data.lengthCm, units === 'us' ? 'metric' : 'us', mark) : '',
  ].filter(Boolean)
  return { data, other: parts.join(' · ') }
}

// ---- observation, exam, problem ---------------------------------------------------------------

export interface ObservationForm { signs: string[], text: string, photoId: string }
export interface ExamForm { reason: string, history: string, findings: Record<string, { state: string, note: string }>, assessment: string, plan: string }
export interface ProblemForm { name: string, onset: string, status: string, resolvedOn: string, notes: string }

function examBlank(): ExamForm {
  return { reason: '', history: '', findings: Object.fromEntries(BODY_SYSTEMS.map(s => [s, { state: '', note: '' }])), assessment: '', plan: '' }
}

// ---- procedure and anaesthesia ----------------------------------------------------------------

export interface AnaesthesiaForm { agent: string, concentration: string, buffer: string, waterTemperature: string, induction: string, recovery: string, monitoring: string }
export interface ProcedureForm {
  code: string
  name: string
  bodySite: string
  side: string
  /** A vet of the pond chosen from the list, or '' for someone named in `performedBy`. */
  performedById: string
  performedBy: string
  notes: string
  outcome: string
  recheckOn: string
  withAnaesthesia: boolean
  anaesthesia: AnaesthesiaForm
}

function anaesthesiaBlank(): AnaesthesiaForm {
  return { agent: 'MS-222 (tricaine methanesulfonate)', concentration: '', buffer: 'Sodium bicarbonate', waterTemperature: '', induction: '', recovery: '', monitoring: '' }
}

function anaesthesiaData(form: AnaesthesiaForm, units: UnitSystem, mark: DecimalMark): Data {
  const temperature = typedNumber(form.waterTemperature, mark)
  const celsius = temperature === undefined || Number.isNaN(temperature) ? temperature : Number(convert(temperature, units === 'us' ? 'f' : 'c', 'c').toFixed(2))
  return {
    // A buffer belongs to MS-222 only; one typed before the agent changed is not sent.
    agent: form.agent, concentrationMgL: typedNumber(form.concentration, mark), buffer: isTricaine(form.agent) ? form.buffer : '',
    waterTemperatureC: celsius, inductionMinutes: typedNumber(form.induction, mark), recoveryMinutes: typedNumber(form.recovery, mark),
    monitoring: form.monitoring,
    entered: units === 'us' && temperature !== undefined ? { waterTemperature: `${form.waterTemperature.trim()} °F` } : undefined,
  }
}

function anaesthesiaForm(data: Data, units: UnitSystem, mark: DecimalMark): AnaesthesiaForm {
  const celsius = data.waterTemperatureC as number | undefined
  return {
    agent: shown(data.agent), concentration: numberShown(data.concentrationMgL, mark), buffer: shown(data.buffer),
    waterTemperature: celsius === undefined ? '' : units === 'us' ? tidy(convert(celsius, 'c', 'f'), 1, mark) : tidy(celsius, 1, mark),
    induction: numberShown(data.inductionMinutes, mark), recovery: numberShown(data.recoveryMinutes, mark), monitoring: shown(data.monitoring),
  }
}

// ---- treatment, lab result, companion, death --------------------------------------------------

export interface TreatmentForm {
  drug: string
  route: string
  injectionSite: string
  dose: string
  doseUnit: string
  startOn: string
  endMode: 'duration' | 'end' | 'open' | 'doses'
  durationDays: string
  endOn: string
  doseCount: string
  intervalHours: string
  /** Local time of the first dose on `startOn`, for a course given as doses. */
  firstDoseTime: string
  exposureMinutes: string
  volumeTreated: string
  amountAdded: string
  amountAddedUnit: string
  givenBy: string
  recheckOn: string
  instructedById: string
  notes: string
}
export interface LabForm {
  panel: string
  panelName: string
  laboratory: string
  sample: string
  intervalSource: string
  analytes: { name: string, value: string, unit: string, low: string, high: string }[]
  organisms: { name: string, count: string }[]
  findings: string
}
export interface CompanionForm { relatedFishId: string, relation: string, relationText: string, note: string }
export interface DeathForm { cause: string, euthanased: boolean, necropsy: string }

export interface EntryForms {
  measurement: MeasurementForm
  observation: ObservationForm
  exam: ExamForm
  problem: ProblemForm
  procedure: ProcedureForm
  anaesthesia: AnaesthesiaForm
  treatment: TreatmentForm
  lab_result: LabForm
  companion: CompanionForm
  death: DeathForm
}

export interface FormContext { units: UnitSystem, decimalMark: DecimalMark, userId: string, userName: string, limited: boolean }

export function blankForm<K extends EntryKind>(kind: K, context: FormContext): EntryForms[K] {
  const today = todayLocal()
  const blanks: { [Kind in EntryKind]: () => EntryForms[Kind] } = {
    measurement: measurementBlank,
    observation: () => ({ signs: [], text: '', photoId: '' }),
    exam: examBlank,
    problem: () => ({ name: '', onset: today, status: context.limited ? 'suspected' : 'active', resolvedOn: '', notes: '' }),
    procedure: () => ({
      code: '', name: '', bodySite: '', side: '', performedById: context.limited ? '' : context.userId, performedBy: '', notes: '', outcome: '', recheckOn: '',
      withAnaesthesia: true, anaesthesia: anaesthesiaBlank(),
    }),
    anaesthesia: anaesthesiaBlank,
    treatment: () => ({
      drug: '', route: '', injectionSite: '', dose: '', doseUnit: 'mg/L', startOn: today, endMode: 'duration', durationDays: '', endOn: '',
      doseCount: '', intervalHours: '24', firstDoseTime: nowLocalTime(), exposureMinutes: '', volumeTreated: '', amountAdded: '', amountAddedUnit: 'g',
      givenBy: context.userName, instructedById: '', notes: '', recheckOn: '',
    }),
    lab_result: () => ({ panel: 'haematology', panelName: '', laboratory: '', sample: '', intervalSource: '', analytes: [], organisms: [], findings: '' }),
    companion: () => ({ relatedFishId: '', relation: 'stays_close', relationText: '', note: '' }),
    death: () => ({ cause: '', euthanased: false, necropsy: '' }),
  }
  return blanks[kind]()
}

/** The entry's data as the schema expects it. */
export function formData(kind: EntryKind, form: EntryForms[EntryKind], units: UnitSystem, mark: DecimalMark): Data {
  switch (kind) {
    case 'measurement': return measurementData(form as MeasurementForm, units, mark)
    case 'observation': {
      const f = form as ObservationForm
      return { signs: f.signs, text: f.text, photoId: f.photoId || undefined }
    }
    case 'exam': {
      const f = form as ExamForm
      const findings = Object.entries(f.findings).filter(([, v]) => v.state).map(([system, v]) => ({ system, state: v.state, note: v.note }))
      return { reason: f.reason, history: f.history, findings, assessment: f.assessment, plan: f.plan }
    }
    case 'problem': {
      const f = form as ProblemForm
      return { name: f.name, onset: f.onset, status: f.status, resolvedOn: f.status === 'resolved' ? f.resolvedOn || undefined : undefined, notes: f.notes }
    }
    case 'procedure': {
      const f = form as ProcedureForm
      return {
        code: f.code || undefined, name: f.name, bodySite: f.bodySite, side: f.side || undefined,
        performedById: f.performedById || undefined, performedBy: f.performedById ? '' : f.performedBy,
        notes: f.notes, outcome: f.outcome, recheckOn: f.recheckOn || undefined,
      }
    }
    case 'anaesthesia': return anaesthesiaData(form as AnaesthesiaForm, units, mark)
    case 'treatment': {
      const f = form as TreatmentForm
      const doses = f.endMode === 'doses'
      const amount = typedNumber(f.amountAdded, mark)
      return {
        drug: f.drug, route: f.route || undefined, injectionSite: f.route === 'injection' ? textOrUndefined(f.injectionSite) : undefined,
        dose: typedNumber(f.dose, mark), doseUnit: f.doseUnit, startOn: f.startOn,
        durationDays: f.endMode === 'duration' ? typedNumber(f.durationDays, mark) : undefined,
        endOn: f.endMode === 'end' ? f.endOn || undefined : undefined,
        doseCount: doses ? typedNumber(f.doseCount, mark) : undefined,
        intervalHours: doses ? typedNumber(f.intervalHours, mark) : undefined,
        firstDoseAt: doses ? occurredAtFrom(f.startOn, f.firstDoseTime) : undefined,
        exposureMinutes: TIMED_ROUTES.includes(f.route as TreatmentRoute) ? typedNumber(f.exposureMinutes, mark) : undefined,
        volumeTreatedL: typedNumber(f.volumeTreated, mark),
        amountAdded: amount, amountAddedUnit: amount === undefined ? undefined : f.amountAddedUnit,
        givenBy: f.givenBy, instructedById: f.instructedById || undefined, notes: f.notes, recheckOn: f.recheckOn || undefined,
      }
    }
    case 'lab_result': {
      const f = form as LabForm
      return {
        panel: f.panel, panelName: f.panel === 'other' ? textOrUndefined(f.panelName) : undefined, laboratory: f.laboratory, sample: f.sample,
        intervalSource: f.intervalSource,
        analytes: f.analytes.filter(a => a.name.trim() || a.value.trim()).map(a => ({
          name: a.name, value: typedNumber(a.value, mark), unit: a.unit, low: typedNumber(a.low, mark), high: typedNumber(a.high, mark),
        })),
        organisms: f.organisms.filter(o => o.name.trim() || o.count.trim()),
        findings: f.findings,
      }
    }
    case 'companion': {
      const f = form as CompanionForm
      return { relatedFishId: f.relatedFishId, relation: f.relation, relationText: f.relation === 'other' ? textOrUndefined(f.relationText) : undefined, note: f.note }
    }
    case 'death': return { ...(form as DeathForm) }
  }
}

/** Procedure with its anaesthesia record: the one request that writes both. */
export function procedureExtras(form: ProcedureForm, units: UnitSystem, mark: DecimalMark) {
  return form.withAnaesthesia ? { anaesthesia: anaesthesiaData(form.anaesthesia, units, mark) } : {}
}

/** An existing entry back into its form, for an amendment. */
export function formFromData(kind: EntryKind, data: Data, context: FormContext): EntryForms[EntryKind] {
  const blank = blankForm(kind, context)
  switch (kind) {
    case 'measurement': return measurementForm(data, context.units, context.decimalMark)
    case 'anaesthesia': return anaesthesiaForm(data, context.units, context.decimalMark)
    case 'exam': {
      const form = blank as ExamForm
      for (const finding of (data.findings ?? []) as { system: string, state: string, note: string }[]) form.findings[finding.system] = { state: finding.state, note: finding.note ?? '' }
      return { ...form, reason: shown(data.reason), history: shown(data.history), assessment: shown(data.assessment), plan: shown(data.plan) }
    }
    case 'procedure': {
      const form = { ...(blank as ProcedureForm), ...stringsOf(data, ['code', 'name', 'bodySite', 'side', 'performedById', 'notes', 'outcome', 'recheckOn'], context.decimalMark), withAnaesthesia: false }
      // Entries from before "Performed by" said "Surgeon".
      form.performedBy = data.performedById ? '' : shown(data.performedBy ?? data.surgeon)
      return form
    }
    case 'treatment': {
      const form = {
        ...(blank as TreatmentForm),
        ...stringsOf(data, ['drug', 'injectionSite', 'dose', 'startOn', 'durationDays', 'endOn', 'doseCount', 'intervalHours', 'exposureMinutes', 'amountAdded', 'givenBy', 'instructedById', 'notes', 'recheckOn'], context.decimalMark),
        // A route or unit stored in an earlier form ('bath', 'dose') is not offered: the person chooses again.
        route: (TREATMENT_ROUTES as readonly string[]).includes(String(data.route)) ? String(data.route) : '',
        doseUnit: data.doseUnit === 'dose' ? 'per fish' : shown(data.doseUnit),
        volumeTreated: numberShown(data.volumeTreatedL, context.decimalMark), amountAddedUnit: shown(data.amountAddedUnit) || 'g',
      }
      form.endMode = data.endOn ? 'end' : data.durationDays !== undefined ? 'duration' : data.doseCount !== undefined ? 'doses' : 'open'
      if (typeof data.firstDoseAt === 'string') {
        const first = new Date(data.firstDoseAt)
        form.firstDoseTime = `${String(first.getHours()).padStart(2, '0')}:${String(first.getMinutes()).padStart(2, '0')}`
      }
      return form
    }
    case 'lab_result': return {
      ...(blank as LabForm), ...stringsOf(data, ['panel', 'panelName', 'laboratory', 'sample', 'intervalSource', 'findings'], context.decimalMark),
      analytes: ((data.analytes ?? []) as Data[]).map(a => stringsOf(a, ['name', 'value', 'unit', 'low', 'high'], context.decimalMark) as LabForm['analytes'][number]),
      organisms: ((data.organisms ?? []) as Data[]).map(o => stringsOf(o, ['name', 'count'], context.decimalMark) as LabForm['organisms'][number]),
    }
    case 'observation': return { signs: [...((data.signs ?? []) as string[])], text: shown(data.text), photoId: shown(data.photoId) }
    case 'death': return { cause: shown(data.cause), euthanased: Boolean(data.euthanased), necropsy: shown(data.necropsy) }
    default: return { ...blank, ...stringsOf(data, Object.keys(blank), context.decimalMark) }
  }
}

/** Stored values back into form text; numbers are written with the person's decimal mark. */
function stringsOf(data: Data, keys: string[], mark: DecimalMark): Record<string, string> {
  return Object.fromEntries(keys.map(k => [k, numberShown(data[k], mark)]))
}
