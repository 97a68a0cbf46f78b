// Seeds the invented demo scenario once; a second run sees the owner's account and stops.
import { sql } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import * as schema from '../server/db/schema'
import { DEMO_PASSWORD, people, type PersonKey } from './seed/people'
import { courtyardPondFish, gardenPondFish, whitlockPondFish } from './seed/fish'
import { seedHistories } from './seed/histories'

const SCIENTIFIC = { koi: 'Cyprinus carpio', goldfish: 'Carassius auratus' } as const

async function main() {
  const pool = new pg.Pool({ connectionString: process.env.DATABASE_URL })
  const db = drizzle(pool, { schema })
  const existing = await db.select({ id: schema.users.id }).from(schema.users).where(sql`lower(${schema.users.email}) = ${people.owner.email}`)
  if (existing.length) {
    console.log('demo data already present: not seeding again')
    await pool.end()
    return
  }
  // The same scrypt hasher and defaults that nuxt-auth-utils uses, so the demo accounts can sign in.
  const passwordHash = await new Hash(new Scrypt({})).make(DEMO_PASSWORD)
  await db.transaction(async (tx) => {
    const ids = {} as Record<PersonKey, string>
    for (const [key, person] of Object.entries(people) as [PersonKey, typeof people[PersonKey]][]) {
      // The demo people write decimals with a point (set here, not left to the default, so tests can rely on it).
      const [row] = await tx.insert(schema.users).values({ name: person.name, email: person.email, passwordHash, units: key === 'family' ? 'us' : 'metric', decimalMark: 'point' }).returning()
      ids[key] = row!.id
    }
    const pond = async (name: string, volumeLitres: number, notes: string, members: [PersonKey, 'owner' | 'keeper' | 'vet'][]) => {
      const [row] = await tx.insert(schema.ponds).values({ name, volumeLitres, notes }).returning()
      await tx.insert(schema.memberships).values(members.map(([who, role]) => ({ pondId: row!.id, userId: ids[who], role })))
      return row!.id
    }
    const garden = await pond('Garden pond', 18000, 'Koi pond, 1.5 m deep, bead filter and UV; shaded by the willow in summer.', [['owner', 'owner'], ['family', 'keeper'], ['keeper', 'keeper'], ['vet', 'vet']])
    const courtyard = await pond('Courtyard pond', 3200, 'Raised pond by the kitchen: goldfish and two young koi growing on.', [['owner', 'owner'], ['family', 'keeper'], ['vet', 'vet']])
    const whitlock = await pond('Whitlock koi pond', 24000, 'A client of the vet, not connected to the Marlow household.', [['otherClient', 'owner'], ['vet', 'vet']])
    const fishIds: Record<string, string> = {}
    for (const [pondId, list] of [[garden, gardenPondFish], [courtyard, courtyardPondFish], [whitlock, whitlockPondFish]] as const) {
      for (const f of list) {
        const [row] = await tx.insert(schema.fish).values({
          pondId, name: f.name, species: f.species, scientificName: SCIENTIFIC[f.species], variety: f.variety, sex: f.sex,
          hatchYear: f.hatchYear, hatchYearEstimated: f.estimated ?? false, microchip: f.microchip ?? null, features: f.features,
          acquiredFrom: f.acquiredFrom, acquiredOn: f.acquiredOn,
        }).returning()
        fishIds[f.name] = row!.id
      }
    }
    await seedHistories(tx, { people: ids, ponds: { garden, courtyard, whitlock }, fish: fishIds })
  })
  console.log('demo data seeded')
  await pool.end()
}

main().catch((error) => {
  console.error('seeding failed:', error)
  process.exit(1)
})
