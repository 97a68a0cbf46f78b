// Demo life histories (timeline entries) are added by the timeline work; the hook is here so the seed has one shape.
import type { NodePgDatabase } from 'drizzle-orm/node-postgres'
import type * as schema from '../../server/db/schema'

export interface SeedContext {
  people: Record<string, string>
  ponds: { garden: string, courtyard: string, whitlock: string }
  fish: Record<string, string>
}

type SeedTx = Parameters<Parameters<NodePgDatabase<typeof schema>['transaction']>[0]>[0]

export async function seedHistories(_tx: SeedTx, _context: SeedContext) {}
