// Seeds the invented demo scenario once; a second run sees the owner's account and stops.
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { eq, sql } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/node-postgres'
import pg from 'pg'
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import * as schema from '../server/db/schema'
import { DEMO_PASSWORD, people, type PersonKey } from './seed/people'
import { courtyardPondFish, gardenPondFish, whitlockPondFish } from './seed/fish'
import { GROWTH, seedHistories } from './seed/histories'
import { prepareDemoPhotos } from './seed/photos'
import { seedWaterTests } from './seed/water'

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
  const allFish = [...gardenPondFish, ...courtyardPondFish, ...whitlockPondFish]
  // Photo files first (the slow part, cached between runs), then every row in one transaction.
  const storageDir = process.env.NUXT_STORAGE_DIR || join(dirname(fileURLToPath(import.meta.url)), '..', 'storage')
  const photos = await prepareDemoPhotos(allFish.map(f => ({
    name: f.name, species: f.species, variety: f.variety, firstPhotoOn: GROWTH[f.name]!.firstRecord,
    latestPhotoOn: f.name === 'Nori' ? '2025-05-10' : '2026-05-09',
  })), storageDir)
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
    const courtyard = await pond('Courtyard pond', 3200, 'Raised pond by the kitchen for the goldfish. Young koi are grown on here until about 40 cm, then moved to the Garden pond.', [['owner', 'owner'], ['family', 'keeper'], ['vet', 'vet']])
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
    for (const photo of photos) {
      const { id, fishName, profile, features, featuresVersion, ...row } = photo
      const uploaderId = whitlockPondFish.some(f => f.name === fishName) ? ids.otherClient : ids.owner
      await tx.insert(schema.photos).values({ id, fishId: fishIds[fishName]!, uploaderId, state: 'ready', createdAt: row.takenAt, updatedAt: row.takenAt, ...row })
      if (features) await tx.insert(schema.photoFeatures).values({ photoId: id, version: featuresVersion, features })
      if (profile) await tx.update(schema.fish).set({ profilePhotoId: id }).where(eq(schema.fish.id, fishIds[fishName]!))
    }
    await seedHistories(tx, { people: ids, ponds: { garden, courtyard, whitlock }, fish: fishIds })
    await seedWaterTests(tx, { people: ids, ponds: { garden, courtyard, whitlock } })
  })
  console.log('demo data seeded')
  await pool.end()
}

main().catch((error) => {
  console.error('seeding failed:', error)
  process.exit(1)
})
