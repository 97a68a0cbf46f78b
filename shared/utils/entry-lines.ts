// One line of words for a timeline entry, for a visit summary and its e-mail: what was done, not every field.
import { isEnucleation } from './timeline-derived'

type Data = Record<string, any> // eslint-disable-line @typescript-eslint/no-explicit-any

const SIDE_WORDS: Record<string, string> = { left: 'left', right: 'right', both: 'both sides', not_applicable: '' }

export function entryLine(kind: string, data: Data): string {
  switch (kind) {
    case 'measurement': {
      const parts = [data.weightG != null ? `${data.weightG} g` : '', data.lengthCm != null ? `${data.lengthCm} cm ${data.lengthType ?? 'total'} length` : ''].filter(Boolean)
      return `Weighed and measured: ${parts.join(', ')}`
    }
    case 'observation':
      return `Observation: ${[...(data.signs ?? []).map((s: string) => s.replaceAll('_', ' ')), data.text].filter(Boolean).join('; ')}`
    case 'exam':
      return `Exam${data.reason ? ` (${data.reason})` : ''}: ${data.assessment || `${(data.findings ?? []).filter((f: Data) => f.state === 'abnormal').length} abnormal findings`}${data.plan ? `. Plan: ${data.plan}` : ''}`
    case 'problem':
      return `Problem: ${data.name} (${data.status})`
    case 'procedure': {
      const side = SIDE_WORDS[data.side] ? `, ${SIDE_WORDS[data.side]}${isEnucleation(data) ? ' eye' : ''}` : ''
      return `Procedure: ${data.name || String(data.code ?? '').replaceAll('_', ' ')}${side}${data.bodySite ? ` (${data.bodySite})` : ''}${data.outcome ? `. Outcome: ${data.outcome}` : ''}${data.recheckOn ? `. Recheck on ${data.recheckOn}` : ''}`
    }
    case 'anaesthesia':
      return `Anaesthesia: ${data.agent} at ${data.concentrationMgL} mg/L${data.recoveryMinutes != null ? `, recovered in ${data.recoveryMinutes} min` : ''}`
    case 'treatment':
      return `Treatment: ${data.drug}, ${String(data.route).replaceAll('_', ' ')}, ${data.dose} ${data.doseUnit} from ${data.startOn}${data.durationDays ? ` for ${data.durationDays} days` : ''}${data.recheckOn ? `. Recheck on ${data.recheckOn}` : ''}`
    case 'lab_result':
      return `Lab result: ${data.panel === 'other' ? data.panelName : String(data.panel).replaceAll('_', ' ')}${data.findings ? `: ${data.findings}` : ''}`
    case 'companion':
      return `Companion note: ${String(data.relation).replaceAll('_', ' ')}`
    case 'death':
      return `Died${data.euthanased ? ' (euthanased)' : ''}${data.cause ? `: ${data.cause}` : ''}`
    default:
      return kind.replaceAll('_', ' ')
  }
}
