import { expect } from 'vitest'
import type { ApiClient } from './client'
import { testDb } from './db'

export const DAY_MS = 86_400_000

/** A calendar day `days` before today (UTC), as the forms send it. */
export function daysAgo(days: number) {
  return new Date(Date.now() - days * DAY_MS).toISOString().slice(0, 10)
}

/** A valid entry of every kind; `relatedFishId` is another fish of the same pond, `vetId` a vet of that pond. */
export function sampleEntries(relatedFishId: string, vetId = '00000000-0000-4000-8000-000000000000') {
  return {
    measurement: { kind: 'measurement', occurredAt: daysAgo(10), data: { weightG: 1250, lengthCm: 42, lengthType: 'total' } },
    observation: { kind: 'observation', occurredAt: daysAgo(9), data: { signs: ['flashing', 'clamped_fins'], text: 'Flashing against the wall after feeding' } },
    exam: {
      kind: 'exam', occurredAt: daysAgo(8),
      data: {
        reason: 'Spring health check', history: 'Flashing for a week',
        findings: [{ system: 'skin', state: 'normal' }, { system: 'gills', state: 'abnormal', note: 'Pale tips on the left side' }],
        assessment: 'Suspect gill parasites', plan: 'Gill biopsy today',
      },
    },
    problemActive: { kind: 'problem', occurredAt: daysAgo(8), data: { name: 'Gill parasites', onset: daysAgo(14), status: 'active' } },
    problemSuspected: { kind: 'problem', occurredAt: daysAgo(8), data: { name: 'Gill parasites?', onset: daysAgo(14), status: 'suspected' } },
    procedure: { kind: 'procedure', occurredAt: daysAgo(7), data: { code: 'fin_trim', bodySite: 'caudal fin', side: 'not_applicable', performedBy: 'Dr Vet' } },
    anaesthesia: {
      kind: 'anaesthesia', occurredAt: daysAgo(7),
      data: { agent: 'MS-222 (tricaine methanesulfonate)', concentrationMgL: 100, buffer: 'sodium bicarbonate', waterTemperatureC: 18, inductionMinutes: 4, recoveryMinutes: 12 },
    },
    treatmentPrescribed: { kind: 'treatment', occurredAt: daysAgo(6), data: { drug: 'Salt (sodium chloride)', route: 'pond_immersion', dose: 3, doseUnit: 'g/L', startOn: daysAgo(6), durationDays: 14 } },
    treatmentGiven: {
      kind: 'treatment', occurredAt: daysAgo(6),
      data: { drug: 'Salt (sodium chloride)', route: 'pond_immersion', dose: 3, doseUnit: 'g/L', startOn: daysAgo(6), durationDays: 14, givenBy: 'Keeper', instructedById: vetId },
    },
    labResult: {
      kind: 'lab_result', occurredAt: daysAgo(5),
      data: { panel: 'haematology', analytes: [{ name: 'Packed cell volume', value: 22, unit: '%', low: 24, high: 43 }], intervalSource: 'Laboratory report' },
    },
    companion: { kind: 'companion', occurredAt: daysAgo(4), data: { relatedFishId, relation: 'leads' } },
    death: { kind: 'death', occurredAt: daysAgo(1), data: { cause: 'Old age' } },
  } as const
}

export async function addEntry(client: ApiClient, fishId: string, entry: unknown, status = 201) {
  const response = await client.post(`/api/fish/${fishId}/timeline`, entry)
  expect(response.status, JSON.stringify(response.body)).toBe(status)
  return response.body as { entry: { id: string, revision: number, [key: string]: unknown }, anaesthesia: { id: string } | null }
}

export async function countEntries(fishId: string) {
  const { rows } = await testDb().query('select count(*)::int as n from timeline_entries where fish_id = $1', [fishId])
  return rows[0].n as number
}
