import type { Kysely, Transaction } from 'kysely'
import type { Database } from '~~/db/database'
import { seedSurfaceLibrary } from '~~/db/seeds/surfaces'
import { startTrial } from './billing'

/** A URL-safe slug for an organisation name, unique among organisations. */
export async function uniqueSlug(db: Kysely<Database> | Transaction<Database>, name: string): Promise<string> {
  const base = name.normalize('NFKD').replace(/[\u0300-\u036f]/g, '').toLowerCase()
    .replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40) || 'organisation'
  for (let i = 0; i < 50; i++) {
    const slug = i === 0 ? base : `${base}-${i + 1}`
    const taken = await db.selectFrom('organisations').select('id').where('slug', '=', slug).executeTakeFirst()
    if (!taken) return slug
  }
  return `${base}-${Math.random().toString(36).slice(2, 8)}`
}

/** Creates an organisation with its first owner, inside the caller's transaction. */
export async function createOrganisation(trx: Transaction<Database>, name: string, ownerId: string) {
  const slug = await uniqueSlug(trx, name)
  const org = await trx.insertInto('organisations').values({ name, slug }).returning(['id', 'slug', 'name']).executeTakeFirstOrThrow()
  await trx.insertInto('memberships').values({ organisation_id: org.id, user_id: ownerId, role: 'owner', removed_at: null }).execute()
  // Every organisation starts with the reference emissivities (reference sheet §4), each with its source.
  await seedSurfaceLibrary(trx, org.id)
  // Every new organisation starts on the trial (see shared/billing/plans.ts).
  await startTrial(trx, org.id)
  return org
}

/** The organisations a user belongs to (active memberships), for the switcher. */
export function organisationsOf(db: Kysely<Database>, userId: string) {
  return db
    .selectFrom('memberships as m')
    .innerJoin('organisations as o', 'o.id', 'm.organisation_id')
    .select(['o.slug', 'o.name', 'm.role'])
    .where('m.user_id', '=', userId)
    .where('m.removed_at', 'is', null)
    .orderBy('o.name')
    .execute()
}
