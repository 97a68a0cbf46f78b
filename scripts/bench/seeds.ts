// Data the benchmarks share: written straight into a migrated scratch database with SQL.
import { Hash } from '@adonisjs/hash'
import { Scrypt } from '@adonisjs/hash/drivers/scrypt'
import type pg from 'pg'
import { BENCH_PASSWORD } from './support'

const FISH = 500
export const BUSY_FISH_ENTRIES = 5000
const POND_FISH = 500
const WEIGHINGS_PER_FISH = 10

/** 500 fish in one pond, each with 3 profile edits and two years of monthly measurements (12,000 entries). */
export async function seedFishListPond(pool: pg.Pool, email = 'bench@example.com') {
  const hash = await new Hash(new Scrypt({})).make(BENCH_PASSWORD)
  const { rows: [user] } = await pool.query(`insert into users (name, email, password_hash) values ('Bench Owner', $2, $1) returning id`, [hash, email])
  const { rows: [pond] } = await pool.query(`insert into ponds (name, volume_litres) values ('Bench pond', 50000) returning id`)
  await pool.query(`insert into memberships (pond_id, user_id, role) values ($1, $2, 'owner')`, [pond.id, user.id])
  await pool.query(`
    insert into fish (pond_id, name, species, scientific_name, variety, hatch_year, microchip, version)
    select $1, 'Fish ' || lpad(i::text, 3, '0'), 'koi', 'Cyprinus carpio', 'Kohaku', 2000 + i % 25, '999' || lpad(i::text, 12, '0'), 4
    from generate_series(1, ${FISH}) i`, [pond.id])
  await pool.query(`
    insert into fish_edits (fish_id, user_id, changes, created_at)
    select f.id, $1, jsonb_build_array(jsonb_build_object('field', 'variety', 'from', 'Sanke', 'to', 'Kohaku')), now() - (n || ' days')::interval
    from fish f cross join generate_series(1, 3) n where f.pond_id = $2`, [user.id, pond.id])
  // Two years of monthly measurements per fish: 12,000 timeline entries in the pond.
  await pool.query(`
    insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
    select f.id, f.pond_id, 'measurement', now() - (m || ' months')::interval, $1,
      jsonb_build_object('weightG', 800 + 20 * (24 - m) + (random() * 50)::int, 'lengthCm', 38 + (24 - m) * 0.2, 'lengthType', 'total')
    from fish f cross join generate_series(1, 24) m where f.pond_id = $2`, [user.id, pond.id])
  await pool.query('analyze')
  const { rows: [fish] } = await pool.query(`select id from fish where pond_id = $1 order by name limit 1`, [pond.id])
  return { userId: user.id as string, pondId: pond.id as string, fishId: fish.id as string }
}

/**
 * A fish with 5,000 timeline entries of eight kinds over twenty years (1,250 weighings; 625 each of
 * procedures, treatments and problems) in a pond of two, and a pond of 500 fish weighed ten times each.
 */
export async function seedBusyFish(pool: pg.Pool, email = 'bench-timeline@example.com') {
  const hash = await new Hash(new Scrypt({})).make(BENCH_PASSWORD)
  const { rows: [user] } = await pool.query(`insert into users (name, email, password_hash) values ('Bench Vet', $2, $1) returning id`, [hash, email])
  const { rows: [pond] } = await pool.query(`insert into ponds (name, volume_litres) values ('Busy fish pond', 20000) returning id`)
  const { rows: [big] } = await pool.query(`insert into ponds (name, volume_litres) values ('Five hundred pond', 90000) returning id`)
  await pool.query(`insert into memberships (pond_id, user_id, role) values ($1, $3, 'vet'), ($2, $3, 'vet')`, [pond.id, big.id, user.id])
  const { rows: [fish] } = await pool.query(`insert into fish (pond_id, name, species, scientific_name, hatch_year) values ($1, 'Busy', 'koi', 'Cyprinus carpio', 2004) returning id`, [pond.id])
  const { rows: [friend] } = await pool.query(`insert into fish (pond_id, name, species, scientific_name, hatch_year) values ($1, 'Friend', 'koi', 'Cyprinus carpio', 2006) returning id`, [pond.id])

  // Twenty years of a busy fish, mixed kinds, every entry with its first revision.
  await pool.query(`
    with made as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, related_fish_id, data)
      select $1, $2, (case when i % 8 = 6 and i > 100 then 'observation'
          else (array['measurement','observation','measurement','treatment','exam','problem','companion','procedure'])[1 + i % 8] end)::timeline_kind,
        timestamptz '2006-01-01 12:00Z' + (i * interval '35 hours'), $3, case when i % 8 = 6 and i <= 100 then $4::uuid end,
        case i % 8
          when 0 then jsonb_build_object('weightG', 500 + i, 'lengthCm', 30 + i / 250.0, 'lengthType', 'total')
          when 2 then jsonb_build_object('weightG', 500 + i, 'lengthType', 'total')
          when 1 then jsonb_build_object('signs', jsonb_build_array('eating_well'), 'text', 'Entry ' || i)
          when 3 then jsonb_build_object('drug', 'Salt', 'route', 'bath', 'dose', 3, 'doseUnit', 'g/L', 'startOn', to_char(timestamptz '2006-01-01' + (i * interval '35 hours'), 'YYYY-MM-DD'), 'durationDays', 14)
          when 4 then jsonb_build_object('findings', '[]'::jsonb, 'assessment', 'Routine ' || i)
          when 5 then case when i % 400 = 5 then jsonb_build_object('name', 'Problem ' || i, 'onset', '2006-01-01', 'status', 'active')
            else jsonb_build_object('name', 'Problem ' || i, 'onset', '2006-01-01', 'status', 'resolved', 'resolvedOn', '2007-01-01') end
          when 6 then case when i <= 100 then jsonb_build_object('relatedFishId', $4::text, 'relation', 'always_together')
            else jsonb_build_object('signs', jsonb_build_array('eating_well'), 'text', 'Entry ' || i) end
          else jsonb_build_object('code', case when i = 7 then 'enucleation' else 'fin_trim' end, 'side', case when i = 7 then 'left' else 'not_applicable' end, 'performedBy', 'Bench Vet')
        end
      from generate_series(1, ${BUSY_FISH_ENTRIES}) i
      returning id, occurred_at, data, author_id
    )
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
    select id, 1, occurred_at, data, author_id from made`, [fish.id, pond.id, user.id, friend.id])

  // The fish table: 500 fish weighed and measured twice a year for five years.
  await pool.query(`
    insert into fish (pond_id, name, species, scientific_name, variety, hatch_year)
    select $1, 'Fish ' || lpad(i::text, 3, '0'), 'koi', 'Cyprinus carpio', 'Kohaku', 2000 + i % 25 from generate_series(1, ${POND_FISH}) i`, [big.id])
  await pool.query(`
    with made as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
      select f.id, f.pond_id, 'measurement', timestamptz '2021-04-20 10:00Z' + (n * interval '182 days'), $1,
        jsonb_build_object('weightG', 900 + 80 * n + (random() * 60)::int, 'lengthCm', 38 + n * 0.8, 'lengthType', 'total')
      from fish f cross join generate_series(0, ${WEIGHINGS_PER_FISH - 1}) n where f.pond_id = $2
      returning id, occurred_at, data, author_id
    )
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
    select id, 1, occurred_at, data, author_id from made`, [user.id, big.id])
  await pool.query('analyze')
  return { userId: user.id as string, fishId: fish.id as string, pondId: big.id as string, busyPondId: pond.id as string }
}

/** Ten fish weighed monthly for two years, the pond page's usual size. */
export async function seedTenFishPond(pool: pg.Pool, userId: string) {
  const { rows: [pond] } = await pool.query(`insert into ponds (name, volume_litres) values ('Ten fish pond', 12000) returning id`)
  await pool.query(`insert into memberships (pond_id, user_id, role) values ($1, $2, 'owner')`, [pond.id, userId])
  await pool.query(`insert into fish (pond_id, name, species, scientific_name, variety, hatch_year)
    select $1, 'Pond fish ' || i, 'koi', 'Cyprinus carpio', 'Showa', 2015 + i % 8 from generate_series(1, 10) i`, [pond.id])
  await pool.query(`
    with made as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
      select f.id, f.pond_id, 'measurement', now() - (m || ' months')::interval, $2,
        jsonb_build_object('weightG', 900 + 20 * (24 - m), 'lengthCm', 36 + (24 - m) * 0.2, 'lengthType', 'total')
      from fish f cross join generate_series(1, 24) m where f.pond_id = $1
      returning id, occurred_at, data, author_id)
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id) select id, 1, occurred_at, data, author_id from made`, [pond.id, userId])
  await pool.query('analyze')
  return pond.id as string
}
