// The fish events a water chart marks: what was given, found, done or lost, so a keeper sees what followed what.
export const POND_EVENT_KINDS = ['treatment', 'death', 'observation', 'procedure'] as const
export type PondEventKind = typeof POND_EVENT_KINDS[number]

export interface PondFishEvent {
  id: string
  fishId: string
  fishName: string
  kind: PondEventKind
  occurredAt: string
  label: string
}

const text = (value: unknown) => (typeof value === 'string' ? value.trim() : '')

/** A few words for the chart's marker and its list. */
export function pondEventLabel(kind: string, data: Record<string, unknown>): string {
  switch (kind) {
    case 'treatment': return text(data.drug) || 'Treatment'
    case 'procedure': return text(data.name) || text(data.code).replaceAll('_', ' ') || 'Procedure'
    case 'death': return text(data.cause) ? `Died: ${text(data.cause)}` : 'Died'
    case 'observation': {
      const signs = Array.isArray(data.signs) ? data.signs.filter(s => typeof s === 'string').map(s => s.replaceAll('_', ' ')) : []
      const words = signs.length ? signs.join(', ') : text(data.text)
      return words.length > 80 ? `${words.slice(0, 79)}…` : words || 'Observation'
    }
    default: return kind
  }
}
